/**
 * The client engine's local rules (lib/sync/engine.ts) on the in-memory store: what a row becomes
 * after each kind of answer, that late answers never roll a row back, and the back-off. [calc]:
 * the expected states are worked out by hand from the rules in the engine's header comment.
 */
import { describe, expect, it } from 'vitest';
import { applyPullPage, applyPushResults, backoffMs, queueChange, type LocalRecord } from '@/lib/sync/engine';
import { MemoryStore } from '@/lib/sync/memory-store';

const T = (over: Partial<LocalRecord> & { id: string }): LocalRecord => ({ version: 0, changeSeq: 0, deletedAt: null, siteId: 's', date: '2026-03-01', newCases: 1, ...over });
let n = 0;
const ids = () => `00000000-0000-4000-8000-${String(++n).padStart(12, '0')}`;

async function store() {
  return new MemoryStore('dev', 'user');
}

describe('local writes', () => {
  it('put the row and its mutation in one transaction with increasing seqs and the shown version as base', async () => {
    const s = await store();
    await applyPullPage(s, { changes: [{ entity: 'tally', record: T({ id: 'a', version: 3, changeSeq: 40 }) }], cursor: 40, more: false });
    const e1 = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'a', newCases: 9 }), payload: { newCases: 9 }, userId: 'user', newId: ids });
    const e2 = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'b', newCases: 2 }), payload: { newCases: 2 }, userId: 'user', newId: ids });
    expect([e1.seq, e2.seq]).toEqual([1, 2]);
    expect(e1.baseVersion).toBe(3); // the server version the screen showed
    expect(e2.baseVersion).toBeNull(); // new on this device
    expect(s.state.records.tally.get('a')!.newCases).toBe(9);
    expect(s.state.shadow.get('a')!.newCases).toBe(1); // the server copy kept aside
    expect(await s.outboxCount()).toBe(2);
    expect(s.state.meta.seq).toBe(2);
  });
});

describe('answers', () => {
  it('an applied edit shows the server record; a late pull of an older version does not roll it back', async () => {
    const s = await store();
    await applyPullPage(s, { changes: [{ entity: 'tally', record: T({ id: 'a', version: 1, changeSeq: 10 }) }], cursor: 10, more: false });
    const e = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'a', newCases: 5 }), payload: {}, userId: 'user', newId: ids });
    await applyPushResults(s, [e], [{ mutationId: e.mutationId, fate: 'applied', record: T({ id: 'a', version: 2, changeSeq: 20, newCases: 5 }) }]);
    expect(s.state.records.tally.get('a')).toMatchObject({ version: 2, newCases: 5 });
    await applyPullPage(s, { changes: [{ entity: 'tally', record: T({ id: 'a', version: 1, changeSeq: 10 }) }], cursor: 10, more: false });
    expect(s.state.records.tally.get('a')).toMatchObject({ version: 2, newCases: 5 });
    expect(s.state.shadow.size).toBe(0);
  });

  it('a second tally of a day sent to the merge desk disappears locally and the server\'s one takes its place', async () => {
    const s = await store();
    const e = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'mine', newCases: 6 }), payload: {}, userId: 'user', newId: ids });
    await applyPushResults(s, [e], [{ mutationId: e.mutationId, fate: 'conflict', reason: 'duplicate_day', conflictId: 'c1', record: T({ id: 'theirs', version: 1, changeSeq: 30, newCases: 5 }) }]);
    expect(s.state.records.tally.has('mine')).toBe(false);
    expect(s.state.records.tally.get('theirs')!.newCases).toBe(5);
    expect(await s.outboxCount()).toBe(0);
    // The answer is kept for the sync screen in the same transaction that emptied the outbox.
    expect(s.state.answers.get(e.mutationId)).toMatchObject({ fate: 'conflict', conflictId: 'c1' });
  });

  it('keeps no answer when the transaction that applies the answers fails, and the entry stays in the outbox', async () => {
    const s = await store();
    const e = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'y', newCases: 3 }), payload: {}, userId: 'user', newId: ids });
    const tx = s.tx.bind(s);
    s.tx = (fn) => tx(async (t) => {
      const out = await fn(t);
      throw new Error(`storage failed after ${String(out)}`);
    });
    await expect(applyPushResults(s, [e], [{ mutationId: e.mutationId, fate: 'applied', record: T({ id: 'y', version: 1, changeSeq: 5, newCases: 3 }) }])).rejects.toThrow(/storage failed/);
    expect(s.state.answers.size).toBe(0);
    expect(await s.outboxCount()).toBe(1);
  });

  it('a refused create is removed locally but kept in the refused list with its values', async () => {
    const s = await store();
    const e = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'x' }), payload: { newCases: 4 }, userId: 'user', newId: ids });
    await applyPushResults(s, [e], [{ mutationId: e.mutationId, fate: 'rejected', reason: 'forbidden', record: null }]);
    expect(s.state.records.tally.has('x')).toBe(false);
    expect(s.state.rejected).toEqual([expect.objectContaining({ entityId: 'x', reason: 'forbidden', payload: { newCases: 4 } })]);
  });

  it('while a later edit of the same record waits, an answer only updates the shadow; the last answer decides', async () => {
    const s = await store();
    const e1 = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'a', newCases: 1 }), payload: {}, userId: 'user', newId: ids });
    const e2 = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'a', newCases: 2 }), payload: {}, userId: 'user', newId: ids });
    await applyPushResults(s, [e1], [{ mutationId: e1.mutationId, fate: 'applied', record: T({ id: 'a', version: 1, changeSeq: 50, newCases: 1 }) }]);
    expect(s.state.records.tally.get('a')!.newCases).toBe(2); // the officer's latest value stays on screen
    expect(s.state.shadow.get('a')!.version).toBe(1);
    // A pull meanwhile brings a newer server version (someone else's); it waits in the shadow too.
    await applyPullPage(s, { changes: [{ entity: 'tally', record: T({ id: 'a', version: 2, changeSeq: 60, newCases: 7 }) }], cursor: 60, more: false });
    expect(s.state.records.tally.get('a')!.newCases).toBe(2);
    // The second edit was stale: a conflict whose answer carries version 2; the row shows the server's value.
    await applyPushResults(s, [e2], [{ mutationId: e2.mutationId, fate: 'conflict', reason: 'stale_version', record: T({ id: 'a', version: 2, changeSeq: 60, newCases: 7 }) }]);
    expect(s.state.records.tally.get('a')).toMatchObject({ version: 2, newCases: 7 });
    expect(s.state.shadow.size).toBe(0);
  });

  it('a stored answer resent late (older record) does not replace a newer shadow copy', async () => {
    const s = await store();
    const e = await queueChange(s, { entity: 'tally', op: 'upsert', record: T({ id: 'a', newCases: 1 }), payload: {}, userId: 'user', newId: ids });
    await applyPullPage(s, { changes: [{ entity: 'tally', record: T({ id: 'a', version: 2, changeSeq: 80, newCases: 9 }) }], cursor: 80, more: false });
    await applyPushResults(s, [e], [{ mutationId: e.mutationId, fate: 'applied', record: T({ id: 'a', version: 1, changeSeq: 70, newCases: 1 }) }]);
    expect(s.state.records.tally.get('a')).toMatchObject({ version: 2, newCases: 9 });
  });
});

describe('back-off', () => {
  it('doubles from 5 s to a 5 min ceiling with ±20 % jitter [calc]', () => {
    expect(backoffMs(1, () => 0.5)).toBe(5000);
    expect(backoffMs(2, () => 0.5)).toBe(10000);
    expect(backoffMs(4, () => 0.5)).toBe(40000);
    expect(backoffMs(20, () => 0.5)).toBe(300000);
    expect(backoffMs(1, () => 0)).toBe(4000);
    expect(backoffMs(1, () => 1)).toBe(6000);
  });
});
