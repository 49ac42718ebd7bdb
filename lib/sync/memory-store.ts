/**
 * A LocalStore held in memory (tests and benchmarks): the same contract as the Dexie store in
 * lib/offline/store.ts. A transaction works on a copy and is committed at its end, so a failure
 * inside one leaves the store as it was, as IndexedDB does.
 */
import type { PullEntity, PushResult } from './protocol';
import type { LocalRecord, LocalStore, OutboxEntry, RejectedEntry, StoreTx, SyncMetaState } from './engine';

interface State {
  records: Record<PullEntity, Map<string, LocalRecord>>;
  shadow: Map<string, LocalRecord>;
  outbox: Map<number, OutboxEntry>;
  meta: SyncMetaState;
  rejected: RejectedEntry[];
  /** The last answer to each pushed mutation, by mutation id. */
  answers: Map<string, PushResult>;
}

const clone = <T>(v: T): T => structuredClone(v);

function copy(s: State): State {
  return {
    records: {
      outbreak: new Map(s.records.outbreak), team: new Map(s.records.team), site: new Map(s.records.site),
      tally: new Map(s.records.tally), scenario: new Map(s.records.scenario),
    },
    shadow: new Map(s.shadow),
    outbox: new Map(s.outbox),
    meta: { ...s.meta },
    rejected: [...s.rejected],
    answers: new Map(s.answers),
  };
}

export class MemoryStore implements LocalStore {
  state: State;
  private queue: Promise<unknown> = Promise.resolve();

  constructor(deviceId: string, userId: string | null) {
    this.state = {
      records: { outbreak: new Map(), team: new Map(), site: new Map(), tally: new Map(), scenario: new Map() },
      shadow: new Map(),
      outbox: new Map(),
      meta: { deviceId, seq: 0, cursor: 0, lastSyncAt: null, userId, registeredFor: null },
      rejected: [],
      answers: new Map(),
    };
  }

  tx<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T> {
    const run = async () => {
      const s = copy(this.state);
      const tx: StoreTx = {
        getRecord: async (e, id) => clone(s.records[e].get(id)),
        putRecord: async (e, r) => void s.records[e].set(r.id, clone(r)),
        deleteRecord: async (e, id) => void s.records[e].delete(id),
        getShadow: async (id) => clone(s.shadow.get(id)),
        putShadow: async (_e, r) => void s.shadow.set(r.id, clone(r)),
        deleteShadow: async (id) => void s.shadow.delete(id),
        pendingFor: async (id) => [...s.outbox.values()].filter((o) => o.entityId === id).map(clone),
        addOutbox: async (o) => void s.outbox.set(o.seq, clone(o)),
        deleteOutbox: async (seqs) => seqs.forEach((q) => s.outbox.delete(q)),
        getMeta: async () => ({ ...s.meta }),
        setMeta: async (p) => void Object.assign(s.meta, p),
        addRejected: async (r) => void s.rejected.push(clone(r)),
        recordAnswer: async (e, r) => void s.answers.set(e.mutationId, clone(r)),
      };
      const out = await fn(tx);
      this.state = s;
      return out;
    };
    const p = this.queue.then(run, run);
    this.queue = p.catch(() => undefined);
    return p;
  }

  private exclusive<T>(fn: () => Promise<T>): Promise<T> {
    const p = this.queue.then(fn, fn);
    this.queue = p.catch(() => undefined);
    return p;
  }

  async outboxFrom(fromSeq: number, limit: number): Promise<OutboxEntry[]> {
    return [...this.state.outbox.values()].filter((o) => o.seq >= fromSeq).sort((a, b) => a.seq - b.seq).slice(0, limit).map(clone);
  }

  async outboxCount(): Promise<number> {
    return this.state.outbox.size;
  }

  async renumberOutbox(fromSeq: number, newStart: number): Promise<void> {
    await this.exclusive(async () => {
      const all = [...this.state.outbox.values()].sort((a, b) => a.seq - b.seq);
      const next = new Map<number, OutboxEntry>();
      let seq = newStart;
      let last = this.state.meta.seq;
      for (const o of all) {
        if (o.seq >= fromSeq) {
          next.set(seq, { ...o, seq });
          last = seq++;
        } else next.set(o.seq, o);
      }
      this.state.outbox = next;
      this.state.meta.seq = last;
    });
  }

  async meta(): Promise<SyncMetaState> {
    return { ...this.state.meta };
  }

  async markAttempt(seqs: number[]): Promise<void> {
    for (const q of seqs) {
      const o = this.state.outbox.get(q);
      if (o) o.attempts++;
    }
  }

  /** Live (not deleted) records of one entity, for comparisons. */
  live(entity: PullEntity): LocalRecord[] {
    return [...this.state.records[entity].values()].filter((r) => !r.deletedAt);
  }
}
