/**
 * The sync client's logic (SYNC.md), independent of where it stores things and how it talks to
 * the server: the browser runs it on Dexie and fetch (lib/offline), the property test on an
 * in-memory store and the real route handlers with faults in between.
 *
 * Local state per record: the row a screen shows. While a record has mutations in the outbox the
 * row is the device's own edit, and what pull brings for it waits in a `shadow` copy; when its last
 * mutation is answered, the row becomes the newest server copy known (the answer's record or the
 * shadow), or disappears if the server has none (a refused create, a second tally of a day).
 * Server copies are only ever replaced by newer ones (higher changeSeq), so a late or resent answer
 * cannot roll a row back.
 */
import type { Change, Fate, Mutation, PullEntity, PullResponse, PushResponse, PushResult, SeqGapDetail } from './protocol';
import type { SyncEntity } from '@/lib/validation/sync';

/** A record as stored on the device: a server record, or a local one (`version` 0, `changeSeq` 0). */
export type LocalRecord = Record<string, unknown> & { id: string; version: number; changeSeq: number; deletedAt: string | null };

export interface OutboxEntry extends Mutation {
  entity: SyncEntity;
  /** Push attempts that included this entry (for the sync page). */
  attempts: number;
}

export interface SyncMetaState {
  deviceId: string;
  /** Last seq handed to a mutation of this device. */
  seq: number;
  /** changeSeq of the last pulled change saved locally. */
  cursor: number;
  /** ISO time of the last complete sync. */
  lastSyncAt: string | null;
  /** The user whose data this device holds, and for whom the device id is registered. */
  userId: string | null;
  registeredFor: string | null;
}

export interface RejectedEntry {
  mutationId: string;
  entity: string;
  entityId: string;
  reason: string;
  payload: Record<string, unknown> | null;
  op: 'upsert' | 'delete';
  at: string;
}

/** One store transaction: every step of applying an answer or a page happens in one. */
export interface StoreTx {
  getRecord(entity: PullEntity, id: string): Promise<LocalRecord | undefined>;
  putRecord(entity: PullEntity, rec: LocalRecord): Promise<void>;
  deleteRecord(entity: PullEntity, id: string): Promise<void>;
  getShadow(id: string): Promise<LocalRecord | undefined>;
  putShadow(entity: PullEntity, rec: LocalRecord): Promise<void>;
  deleteShadow(id: string): Promise<void>;
  /** Outbox entries for a record (any seq). */
  pendingFor(entityId: string): Promise<OutboxEntry[]>;
  addOutbox(e: OutboxEntry): Promise<void>;
  deleteOutbox(seqs: number[]): Promise<void>;
  getMeta(): Promise<SyncMetaState>;
  setMeta(patch: Partial<SyncMetaState>): Promise<void>;
  addRejected(r: RejectedEntry): Promise<void>;
  /**
   * Keeps the server's answer to an outbox entry for the sync screen, in the transaction that takes
   * the entry out of the outbox (so a tab closed right after a push loses neither).
   */
  recordAnswer(e: OutboxEntry, r: PushResult, at: string): Promise<void>;
}

export interface LocalStore {
  tx<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T>;
  /** The first `limit` outbox entries from `fromSeq` on, in seq order. */
  outboxFrom(fromSeq: number, limit: number): Promise<OutboxEntry[]>;
  outboxCount(): Promise<number>;
  /**
   * Gives the outbox entries with seq >= `fromSeq` new consecutive seqs starting at `newStart`
   * (mutation ids unchanged) and moves meta.seq to the last one.
   */
  renumberOutbox(fromSeq: number, newStart: number): Promise<void>;
  meta(): Promise<SyncMetaState>;
  /** Counts an attempt on the entries of a batch (never removes them). */
  markAttempt(seqs: number[]): Promise<void>;
}

/** An HTTP-level failure of a sync call; `status` 0 means no answer at all (offline, timeout). */
export class SyncHttpError extends Error {
  constructor(readonly status: number, readonly code: string, message: string, readonly detail?: Record<string, unknown>) {
    super(message);
    this.name = 'SyncHttpError';
  }
}

export interface Transport {
  registerDevice(id: string, label: string): Promise<void>;
  push(body: { deviceId: string; mutations: Mutation[] }): Promise<PushResponse>;
  pull(cursor: number, limit: number, deviceId: string): Promise<PullResponse>;
}

export const ENTITY_TABLE: Record<PullEntity, string> = {
  outbreak: 'outbreaks', team: 'teams', site: 'sites', tally: 'tallies', scenario: 'scenarios',
};

const newer = (a: LocalRecord | undefined | null, b: LocalRecord | undefined | null): LocalRecord | undefined =>
  !a ? (b ?? undefined) : !b ? a : Number(b.changeSeq) > Number(a.changeSeq) ? b : a;

/** A server copy arrives (pull, or an answer's record): kept in the shadow while the record has pending edits. */
async function receive(tx: StoreTx, entity: PullEntity, rec: LocalRecord, skipSeqs: ReadonlySet<number> = new Set()): Promise<void> {
  const pending = (await tx.pendingFor(rec.id)).filter((e) => !skipSeqs.has(e.seq));
  if (pending.length) {
    const shadow = await tx.getShadow(rec.id);
    if (newer(shadow, rec) === rec && rec !== shadow) await tx.putShadow(entity, rec);
    return;
  }
  const local = await tx.getRecord(entity, rec.id);
  if (!local || Number(local.changeSeq) === 0 || Number(rec.changeSeq) > Number(local.changeSeq)) await tx.putRecord(entity, rec);
}

/**
 * Records a local change: the row and its outbox mutation in one transaction (SYNC.md principle
 * 1). `baseVersion` is the server version the row showed (null for a record new on this device).
 */
export async function queueChange(
  store: LocalStore,
  change: { entity: SyncEntity; op: 'upsert' | 'delete'; record: LocalRecord; payload: Record<string, unknown> | null; userId: string | null; now?: Date; newId?: () => string },
): Promise<OutboxEntry> {
  const now = change.now ?? new Date();
  const newId = change.newId ?? (() => crypto.randomUUID());
  return store.tx(async (tx) => {
    const meta = await tx.getMeta();
    const prev = await tx.getRecord(change.entity, change.record.id);
    const base = prev && Number(prev.version) > 0 ? Number(prev.version) : null;
    const row: LocalRecord = {
      ...change.record,
      version: prev ? Number(prev.version) : 0,
      changeSeq: prev ? Number(prev.changeSeq) : 0,
      deletedAt: change.op === 'delete' ? now.toISOString() : null,
    };
    // The shown server copy moves to the shadow so that a later answer can fall back on it.
    const pendingBefore = await tx.pendingFor(change.record.id);
    if (prev && !pendingBefore.length && Number(prev.version) > 0) await tx.putShadow(change.entity, prev);
    await tx.putRecord(change.entity, row);
    const seq = meta.seq + 1;
    const entry: OutboxEntry = {
      mutationId: newId(), seq, entity: change.entity, entityId: change.record.id, op: change.op,
      baseVersion: base, payload: change.op === 'delete' ? null : change.payload, recordedAt: now.toISOString(),
      recordedBy: change.userId, attempts: 0,
    };
    await tx.addOutbox(entry);
    await tx.setMeta({ seq });
    return entry;
  });
}

/** Applies the answers of one push: each answered entry leaves the outbox in the same transaction. */
export async function applyPushResults(store: LocalStore, batch: OutboxEntry[], results: PushResult[]): Promise<void> {
  const byId = new Map(results.map((r) => [r.mutationId, r]));
  const at = new Date().toISOString();
  await store.tx(async (tx) => {
    const answered = batch.filter((e) => byId.has(e.mutationId));
    const done = new Set<number>();
    for (const e of answered) {
      const r = byId.get(e.mutationId)!;
      done.add(e.seq);
      await tx.recordAnswer(e, r, at);
      const rec = (r.record ?? null) as LocalRecord | null;
      const stillPending = (await tx.pendingFor(e.entityId)).filter((p) => !done.has(p.seq));
      if (rec && rec.id !== e.entityId) await receive(tx, e.entity, rec, done);
      if (stillPending.length) {
        if (rec && rec.id === e.entityId) {
          const shadow = await tx.getShadow(e.entityId);
          if (newer(shadow, rec) === rec) await tx.putShadow(e.entity, rec);
        }
      } else {
        const best = newer(await tx.getShadow(e.entityId), rec && rec.id === e.entityId ? rec : null);
        if (best) await tx.putRecord(e.entity, best);
        else await tx.deleteRecord(e.entity, e.entityId);
        await tx.deleteShadow(e.entityId);
      }
      if (r.fate === 'rejected') {
        await tx.addRejected({ mutationId: e.mutationId, entity: e.entity, entityId: e.entityId, reason: r.reason ?? 'rejected', payload: e.payload, op: e.op, at: new Date().toISOString() });
      }
    }
    await tx.deleteOutbox([...done]);
  });
}

/** Saves one pull page and its cursor in one transaction (the cursor moves only with the data). */
export async function applyPullPage(store: LocalStore, page: PullResponse): Promise<void> {
  await store.tx(async (tx) => {
    for (const c of page.changes) await receive(tx, c.entity, c.record as LocalRecord);
    await tx.setMeta({ cursor: page.cursor });
  });
}

export interface SyncReport {
  ok: boolean;
  /** 'offline' (no answer), 'unauthenticated' (sign in to sync), 'server' (5xx), 'refused' (other 4xx). */
  error?: 'offline' | 'unauthenticated' | 'server' | 'refused';
  message?: string;
  pushed: Record<Fate, number>;
  pulled: number;
  /** The answers of this run (the sync page lists them). */
  results: PushResult[];
}

export interface SyncOptions {
  batchSize?: number;
  pullLimit?: number;
  deviceLabel?: string;
  /** Batches sent before waiting for answers (1 in the browser; the property test sends 2 to provoke reordering). */
  pipeline?: number;
  /** Upper bound of push rounds of one run (a guard against a server that never moves). */
  maxRounds?: number;
  /** Push only (no pull, and lastSyncAt unchanged). */
  pushOnly?: boolean;
}

function classify(err: unknown): Pick<SyncReport, 'error' | 'message'> {
  if (err instanceof SyncHttpError) {
    if (err.status === 0) return { error: 'offline', message: err.message };
    if (err.status === 401) return { error: 'unauthenticated', message: 'Sign in to sync: the session has ended. Your changes wait on this device.' };
    if (err.status >= 500) return { error: 'server', message: err.message };
    return { error: 'refused', message: err.message };
  }
  return { error: 'server', message: err instanceof Error ? err.message : String(err) };
}

/**
 * One sync: register the device if needed, push the whole outbox (in batches, oldest first),
 * then pull every page. Never removes an outbox entry without its answer.
 */
export async function syncOnce(store: LocalStore, transport: Transport, opts: SyncOptions = {}): Promise<SyncReport> {
  const batchSize = opts.batchSize ?? 500;
  const pipeline = Math.max(1, opts.pipeline ?? 1);
  const report: SyncReport = { ok: false, pushed: { applied: 0, duplicate: 0, conflict: 0, rejected: 0 }, pulled: 0, results: [] };
  try {
    let meta = await store.meta();
    if (!meta.userId) return { ...report, error: 'unauthenticated', message: 'Sign in to sync.' };
    if (meta.registeredFor !== meta.userId) {
      await transport.registerDevice(meta.deviceId, opts.deviceLabel ?? 'Tablet');
      await store.tx((tx) => tx.setMeta({ registeredFor: meta.userId }));
      meta = await store.meta();
    }
    let rounds = 0;
    const maxRounds = opts.maxRounds ?? 1000;
    for (;;) {
      if (++rounds > maxRounds) throw new SyncHttpError(503, 'no_progress', 'The server did not take the outbox; will retry.');
      const head = await store.outboxFrom(0, batchSize * pipeline);
      if (!head.length) break;
      const batches: OutboxEntry[][] = [];
      for (let i = 0; i < head.length; i += batchSize) batches.push(head.slice(i, i + batchSize));
      await store.markAttempt(head.map((e) => e.seq));
      const sent = batches.map((b) =>
        transport.push({ deviceId: meta.deviceId, mutations: b.map(({ attempts: _a, ...m }) => m) }).then(
          (res) => ({ ok: true as const, batch: b, res }),
          (err: unknown) => ({ ok: false as const, batch: b, err }),
        ),
      );
      let gap: SeqGapDetail | null = null;
      let failure: unknown = null;
      for (const p of sent) {
        const r = await p;
        if (r.ok) {
          await applyPushResults(store, r.batch, r.res.results);
          for (const x of r.res.results) {
            report.pushed[x.fate]++;
            report.results.push(x);
          }
        } else if (r.err instanceof SyncHttpError && r.err.status === 404 && r.err.detail?.reason === 'device_unknown') {
          await store.tx((tx) => tx.setMeta({ registeredFor: null }));
          await transport.registerDevice(meta.deviceId, opts.deviceLabel ?? 'Tablet');
          await store.tx((tx) => tx.setMeta({ registeredFor: meta.userId }));
        } else if (r.err instanceof SyncHttpError && r.err.status === 409 && (r.err.detail?.reason === 'seq_gap' || r.err.detail?.reason === 'seq_reused')) {
          gap = { reason: r.err.detail.reason, expectedSeq: Number(r.err.detail.expectedSeq), seq: Number(r.err.detail.seq) };
        } else failure ??= r.err;
      }
      if (failure) throw failure;
      // A refused seq answered to a batch sent alone is fresh news: the server expects a seq this
      // device no longer holds (its counter was reset or restored), and the entries from the
      // refused one on were never recorded, so they take the seqs the server expects. With
      // several batches in flight the answer may predate another batch's effect: just resend.
      if (gap && batches.length === 1 && Number.isFinite(gap.seq) && gap.seq !== gap.expectedSeq) {
        await store.renumberOutbox(gap.seq, gap.expectedSeq);
      }
    }
    if (opts.pushOnly) return { ...report, ok: true };
    for (;;) {
      const m = await store.meta();
      const page = await transport.pull(m.cursor, opts.pullLimit ?? 500, m.deviceId);
      await applyPullPage(store, page);
      report.pulled += page.changes.length;
      if (!page.more) break;
    }
    await store.tx((tx) => tx.setMeta({ lastSyncAt: new Date().toISOString() }));
    return { ...report, ok: true };
  } catch (err) {
    return { ...report, ok: false, ...classify(err) };
  }
}

/** Back-off before retry number `failures` (1, 2, …): 5 s doubling to 5 min, with ±20 % jitter. */
export function backoffMs(failures: number, random = Math.random): number {
  const base = Math.min(5_000 * 2 ** Math.max(0, failures - 1), 300_000);
  return Math.round(base * (0.8 + 0.4 * random()));
}

export type { Change };
