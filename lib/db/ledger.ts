import { createHash } from 'node:crypto';
import { Op, type Transaction, type WhereOptions } from 'sequelize';
import { Device, LedgerEntry, User } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { db, dialect, writeTx } from './connection';

export interface LedgerInput {
  kind: string;
  userId?: string | null;
  deviceId?: string | null;
  outbreakId?: string | null;
  counts?: Record<string, number> | null;
  /** Milliseconds the action took. */
  durationMs?: number | null;
  detail?: Record<string, unknown> | null;
}

export interface LedgerRow {
  id: number;
  at: string;
  kind: string;
  userId: string | null;
  deviceId: string | null;
  outbreakId: string | null;
  counts: Record<string, number> | null;
  durationMs: number | null;
  detail: Record<string, unknown> | null;
  prevHash: string;
  hash: string;
}

const GENESIS = '0'.repeat(64);

function rowHash(prevHash: string, r: Omit<LedgerRow, 'id' | 'hash' | 'prevHash'>): string {
  const canonical = JSON.stringify([prevHash, r.at, r.kind, r.userId, r.deviceId, r.outbreakId, r.counts, r.durationMs, r.detail]);
  return createHash('sha256').update(canonical).digest('hex');
}

function toRow(e: LedgerEntry): LedgerRow {
  return {
    id: e.id,
    at: new Date(e.at).toISOString(),
    kind: e.kind,
    userId: e.userId,
    deviceId: e.deviceId,
    outbreakId: e.outbreakId,
    counts: e.counts ? JSON.parse(e.counts) : null,
    durationMs: e.durationMs,
    detail: e.detail ? JSON.parse(e.detail) : null,
    prevHash: e.prevHash,
    hash: e.hash,
  };
}

/**
 * Appends one ledger row inside the caller's write transaction (so the row exists exactly when
 * the action it records was committed). The chain hash covers the previous row's hash.
 */
export async function appendLedger(t: Transaction, input: LedgerInput): Promise<LedgerRow> {
  const prevHash = knownLastHash(t) ?? (await LedgerEntry.findOne({ order: [['id', 'DESC']], transaction: t, attributes: ['hash'] }))?.hash ?? GENESIS;
  const body = {
    at: new Date().toISOString(),
    kind: input.kind,
    userId: input.userId ?? null,
    deviceId: input.deviceId ?? null,
    outbreakId: input.outbreakId ?? null,
    counts: input.counts ?? null,
    durationMs: input.durationMs == null ? null : Math.round(input.durationMs),
    detail: input.detail ?? null,
  };
  const hash = rowHash(prevHash, body);
  const e = await LedgerEntry.create(
    {
      ...body,
      at: new Date(body.at),
      counts: body.counts ? JSON.stringify(body.counts) : null,
      detail: body.detail ? JSON.stringify(body.detail) : null,
      prevHash,
      hash,
    },
    { transaction: t },
  );
  if (dialect() === 'sqlite') rememberLastHash(t, hash);
  return toRow(e);
}

/**
 * The hash of the last ledger row written in a transaction, so that the writes of one commit
 * (a sync push, or a group of them: connection.ts writeTx) read it from the table once. Kept per
 * transaction and savepoint: a savepoint's value reaches its parent when the savepoint commits,
 * and dies with it when it rolls back, as its rows do. SQLite only, where the write lock makes
 * this transaction the only writer; PostgreSQL reads the table every time.
 */
const lastHashes = new WeakMap<Transaction, string>();
type Nested = Transaction & { parent?: Transaction };

function knownLastHash(t: Transaction): string | undefined {
  for (let x: Nested | undefined = t; x; x = x.parent) {
    const h = lastHashes.get(x);
    if (h) return h;
  }
  return undefined;
}

function rememberLastHash(t: Transaction, hash: string): void {
  lastHashes.set(t, hash);
  const parent = (t as Nested).parent;
  if (parent) t.afterCommit(() => rememberLastHash(parent, hash));
}

/** Appends a ledger row in a transaction of its own (sign-ins, mail). */
export function recordLedger(input: LedgerInput): Promise<LedgerRow> {
  return writeTx((t) => appendLedger(t, input));
}

export interface LedgerFilter {
  userId?: string;
  deviceId?: string;
  outbreakId?: string;
  kind?: string;
  /** ISO date-times, inclusive. */
  from?: string;
  to?: string;
  /** Limit the rows to these outbreaks (the reader's scope); rows with no outbreak stay visible. */
  outbreakIds?: string[];
  limit?: number;
  offset?: number;
}

export async function listLedger(f: LedgerFilter = {}): Promise<{ rows: LedgerRow[]; total: number }> {
  await db();
  const where: WhereOptions = {};
  const and: WhereOptions[] = [];
  if (f.userId) and.push({ userId: f.userId });
  if (f.deviceId) and.push({ deviceId: f.deviceId });
  if (f.kind) and.push({ kind: f.kind });
  if (f.outbreakId) and.push({ outbreakId: f.outbreakId });
  if (f.outbreakIds) and.push({ [Op.or]: [{ outbreakId: { [Op.in]: f.outbreakIds } }, { outbreakId: null }] });
  if (f.from) and.push({ at: { [Op.gte]: new Date(f.from) } });
  if (f.to) and.push({ at: { [Op.lte]: new Date(f.to) } });
  if (and.length) Object.assign(where, { [Op.and]: and });
  const { rows, count } = await LedgerEntry.findAndCountAll({
    where,
    order: [['id', 'DESC']],
    limit: Math.min(f.limit ?? 200, 5000),
    offset: f.offset ?? 0,
  });
  return { rows: rows.map(toRow), total: count };
}

/** Recomputes the hash chain. `ok: false` names the first row whose hash or link is wrong. */
export async function verifyLedger(): Promise<{ ok: boolean; rows: number; firstBadId?: number }> {
  await db();
  let prev = GENESIS;
  let n = 0;
  let lastId = 0;
  for (;;) {
    const batch = await LedgerEntry.findAll({ where: { id: { [Op.gt]: lastId } }, order: [['id', 'ASC']], limit: 1000 });
    if (!batch.length) break;
    for (const e of batch) {
      const r = toRow(e);
      if (r.prevHash !== prev || rowHash(prev, r) !== r.hash) return { ok: false, rows: n, firstBadId: r.id };
      prev = r.hash;
      n++;
      lastId = r.id;
    }
  }
  return { ok: true, rows: n };
}

/** The reader's view of the ledger: ledger:read, limited to their outbreaks (admins: everything). */
export async function listLedgerForActor(
  actor: Actor,
  q: { user?: string; device?: string; outbreak?: string; kind?: string; from?: string; to?: string; limit?: number; offset?: number },
): Promise<{ rows: LedgerRow[]; total: number }> {
  authorize(actor, 'ledger:read', q.outbreak ? { outbreakId: q.outbreak } : {});
  return listLedger({
    userId: q.user, deviceId: q.device, outbreakId: q.outbreak, kind: q.kind,
    // Whole days: `to` covers the day it names.
    from: q.from ? `${q.from}T00:00:00.000Z` : undefined,
    to: q.to ? `${q.to}T23:59:59.999Z` : undefined,
    outbreakIds: actor.role === 'admin' ? undefined : actor.outbreakIds,
    limit: q.limit, offset: q.offset,
  });
}

const CSV_COLUMNS = ['id', 'at', 'kind', 'user', 'userId', 'device', 'deviceId', 'outbreakId', 'applied', 'duplicate', 'conflict', 'rejected', 'changes', 'durationMs', 'detail', 'hash'] as const;

/** A CSV cell: quoted when needed; a leading =, +, - or @ is defused so a spreadsheet does not run it. */
function cell(v: unknown): string {
  let s = v == null ? '' : typeof v === 'string' ? v : typeof v === 'number' ? String(v) : JSON.stringify(v);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Ledger rows as CSV (RFC 4180, CRLF), oldest first, with names beside the ids. */
export function ledgerToCsv(rows: LedgerRow[], names: { users: Record<string, string>; devices: Record<string, string> }): string {
  const lines = [CSV_COLUMNS.join(',')];
  for (const r of [...rows].sort((a, b) => a.id - b.id)) {
    const c = r.counts ?? {};
    lines.push([
      r.id, r.at, r.kind, r.userId ? names.users[r.userId] ?? '' : '', r.userId, r.deviceId ? names.devices[r.deviceId] ?? '' : '', r.deviceId,
      r.outbreakId, c.applied, c.duplicate, c.conflict, c.rejected, c.changes, r.durationMs, r.detail, r.hash,
    ].map(cell).join(','));
  }
  return lines.join('\r\n') + '\r\n';
}

/** Names of the users and devices a set of ledger rows mentions. */
export async function ledgerNames(rows: LedgerRow[]): Promise<{ users: Record<string, string>; devices: Record<string, string> }> {
  const userIds = [...new Set(rows.map((r) => r.userId).filter((x): x is string => Boolean(x)))];
  const deviceIds = [...new Set(rows.map((r) => r.deviceId).filter((x): x is string => Boolean(x)))];
  const users = userIds.length ? await User.findAll({ where: { id: { [Op.in]: userIds } }, attributes: ['id', 'name'] }) : [];
  const devices = deviceIds.length ? await Device.findAll({ where: { id: { [Op.in]: deviceIds } }, attributes: ['id', 'label'] }) : [];
  return {
    users: Object.fromEntries(users.map((u) => [u.id, u.name])),
    devices: Object.fromEntries(devices.map((d) => [d.id, d.label])),
  };
}
