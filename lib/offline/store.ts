'use client';
/**
 * The sync engine's LocalStore on the Dexie database: one Dexie `rw` transaction per engine
 * transaction, so a record, its outbox entry and the meta counter commit together or not at all.
 */
import type { LocalRecord, LocalStore, OutboxEntry, StoreTx, SyncMetaState } from '@/lib/sync/engine';
import type { PullEntity } from '@/lib/sync/protocol';
import { localDb, tableOf, type EbbcastDb } from './db';

const META_KEYS = ['deviceId', 'seq', 'cursor', 'lastSyncAt', 'userId', 'registeredFor'] as const;

async function readMeta(db: EbbcastDb): Promise<SyncMetaState> {
  const rows = await db.meta.bulkGet([...META_KEYS]);
  const v = Object.fromEntries(rows.filter(Boolean).map((r) => [r!.key, r!.value])) as Partial<SyncMetaState>;
  return {
    deviceId: typeof v.deviceId === 'string' ? v.deviceId : '',
    seq: Number(v.seq ?? 0),
    cursor: Number(v.cursor ?? 0),
    lastSyncAt: (v.lastSyncAt as string | null) ?? null,
    userId: (v.userId as string | null) ?? null,
    registeredFor: (v.registeredFor as string | null) ?? null,
  };
}

async function writeMeta(db: EbbcastDb, patch: Partial<SyncMetaState>): Promise<void> {
  await db.meta.bulkPut(Object.entries(patch).map(([key, value]) => ({ key, value })));
}

/** The device id, made once per installation (kept until local data are cleared). */
export async function ensureDeviceId(db: EbbcastDb = localDb()): Promise<string> {
  return db.transaction('rw', db.meta, async () => {
    const row = await db.meta.get('deviceId');
    if (typeof row?.value === 'string' && row.value) return row.value;
    const id = crypto.randomUUID();
    await db.meta.put({ key: 'deviceId', value: id });
    return id;
  });
}

export class DexieStore implements LocalStore {
  constructor(readonly db: EbbcastDb = localDb()) {}

  private tables() {
    const d = this.db;
    return [d.outbreaks, d.teams, d.sites, d.tallies, d.scenarios, d.shadow, d.outbox, d.meta, d.rejected, d.results];
  }

  tx<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T> {
    const d = this.db;
    return d.transaction('rw', this.tables(), async () => {
      const tx: StoreTx = {
        getRecord: (e: PullEntity, id) => tableOf(d, e).get(id),
        putRecord: async (e, r) => void (await tableOf(d, e).put(r)),
        deleteRecord: (e, id) => tableOf(d, e).delete(id),
        getShadow: async (id) => (await d.shadow.get(id))?.record,
        putShadow: async (e, r: LocalRecord) => void (await d.shadow.put({ id: r.id, entity: e, record: r })),
        deleteShadow: (id) => d.shadow.delete(id),
        pendingFor: (id) => d.outbox.where('entityId').equals(id).toArray(),
        addOutbox: async (o) => void (await d.outbox.add(o)),
        deleteOutbox: (seqs) => d.outbox.bulkDelete(seqs),
        getMeta: () => readMeta(d),
        setMeta: (p) => writeMeta(d, p),
        addRejected: async (r) => void (await d.rejected.put(r)),
        recordAnswer: async (e, r, at) => void (await d.results.put({ mutationId: e.mutationId, at, entity: e.entity, entityId: e.entityId, op: e.op, result: r })),
      };
      return fn(tx);
    });
  }

  outboxFrom(fromSeq: number, limit: number): Promise<OutboxEntry[]> {
    return this.db.outbox.where('seq').aboveOrEqual(fromSeq).limit(limit).toArray();
  }

  outboxCount(): Promise<number> {
    return this.db.outbox.count();
  }

  async renumberOutbox(fromSeq: number, newStart: number): Promise<void> {
    const d = this.db;
    await d.transaction('rw', d.outbox, d.meta, async () => {
      const moving = await d.outbox.where('seq').aboveOrEqual(fromSeq).toArray();
      await d.outbox.bulkDelete(moving.map((m) => m.seq));
      let seq = newStart;
      await d.outbox.bulkAdd(moving.map((m) => ({ ...m, seq: seq++ })));
      if (moving.length) await writeMeta(d, { seq: seq - 1 });
    });
  }

  meta(): Promise<SyncMetaState> {
    return readMeta(this.db);
  }

  async markAttempt(seqs: number[]): Promise<void> {
    const d = this.db;
    await d.transaction('rw', d.outbox, async () => {
      for (const s of seqs) await d.outbox.update(s, { attempts: ((await d.outbox.get(s))?.attempts ?? 0) + 1 });
    });
  }
}
