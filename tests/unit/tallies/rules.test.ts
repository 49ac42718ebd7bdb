import { describe, expect, it } from 'vitest';
import { decideTallyDelete, decideTallyUpsert, normaliseValues, type CurrentTally } from '@/lib/sync/tally-rules';
import { entryWarnings } from '@/lib/tallies/warnings';

const v = (newCases: number, note: string | null = null) => normaliseValues({ newCases, note });
const cur = (over: Partial<CurrentTally> = {}): CurrentTally => ({ version: 2, deleted: false, deviceId: 'dev-a', values: v(5), ...over });

// [cp] SYNC.md principles 5 and 6: the server's value stays; every disagreement becomes a conflict row.
describe('tally conflict rules', () => {
  it('inserts when neither the id nor the site and day exist', () => {
    expect(decideTallyUpsert({ baseVersion: null, deviceId: 'dev-b', values: v(3) }, null, null)).toEqual({ action: 'insert' });
  });
  it('treats a second create for the same site and day as unchanged when equal, else duplicate_day', () => {
    expect(decideTallyUpsert({ baseVersion: null, deviceId: 'dev-b', values: v(5) }, null, cur())).toEqual({ action: 'unchanged' });
    expect(decideTallyUpsert({ baseVersion: null, deviceId: 'dev-b', values: v(6) }, null, cur())).toEqual({ action: 'conflict', reason: 'duplicate_day' });
    // Even the same device: two records for one day are two records.
    expect(decideTallyUpsert({ baseVersion: null, deviceId: 'dev-a', values: v(6) }, null, cur())).toEqual({ action: 'conflict', reason: 'duplicate_day' });
  });
  it('updates on the current version, refuses an older one from another device, accepts a device’s own queue', () => {
    expect(decideTallyUpsert({ baseVersion: 2, deviceId: 'dev-b', values: v(7) }, cur(), null)).toEqual({ action: 'update' });
    expect(decideTallyUpsert({ baseVersion: 1, deviceId: 'dev-b', values: v(7) }, cur(), null)).toEqual({ action: 'conflict', reason: 'stale_version' });
    expect(decideTallyUpsert({ baseVersion: 1, deviceId: 'dev-b', values: v(5) }, cur(), null)).toEqual({ action: 'unchanged' });
    expect(decideTallyUpsert({ baseVersion: 1, deviceId: 'dev-a', values: v(7) }, cur(), null)).toEqual({ action: 'update' });
    // The web (no device) never counts as "the same device".
    expect(decideTallyUpsert({ baseVersion: 1, deviceId: null, values: v(7) }, cur({ deviceId: null }), null)).toEqual({ action: 'conflict', reason: 'stale_version' });
  });
  it('makes any edit of a tombstone an edit_deleted conflict, and a second delete unchanged', () => {
    expect(decideTallyUpsert({ baseVersion: 3, deviceId: 'dev-a', values: v(5) }, cur({ deleted: true, version: 3 }), null)).toEqual({ action: 'conflict', reason: 'edit_deleted' });
    expect(decideTallyDelete({ baseVersion: 1, deviceId: 'dev-b' }, cur({ deleted: true }))).toEqual({ action: 'unchanged' });
  });
  it('deletes on the current version and keeps the tally on an older one', () => {
    expect(decideTallyDelete({ baseVersion: 2, deviceId: 'dev-b' }, cur())).toEqual({ action: 'delete' });
    expect(decideTallyDelete({ baseVersion: 1, deviceId: 'dev-b' }, cur())).toEqual({ action: 'conflict', reason: 'stale_version' });
    expect(decideTallyDelete({ baseVersion: null, deviceId: 'dev-b' }, cur())).toEqual({ action: 'conflict', reason: 'stale_version' });
  });
  it('compares values after normalising blanks (absent = null, blank note = null)', () => {
    expect(normaliseValues({ newCases: 1, note: '  ' })).toEqual({ newCases: 1, recoveries: null, deaths: null, admissions: null, note: null });
  });
});

describe('entry warnings', () => {
  it('warns above the population, per field', () => {
    const w = entryWarnings({ newCases: 900, admissions: 861, population: 860 });
    expect(w.map((x) => `${x.code}:${x.field}`)).toEqual(['above_population:newCases', 'above_population:admissions']);
    expect(entryWarnings({ newCases: 860, population: 860 })).toEqual([]);
  });
  it('warns on more than a tenfold jump, measuring a rise from 0 against 1', () => {
    expect(entryWarnings({ newCases: 30, population: 1000, previousNewCases: 3 })).toEqual([]);
    expect(entryWarnings({ newCases: 31, population: 1000, previousNewCases: 3 })[0]?.code).toBe('tenfold_jump');
    expect(entryWarnings({ newCases: 10, population: 1000, previousNewCases: 0 })).toEqual([]);
    expect(entryWarnings({ newCases: 11, population: 1000, previousNewCases: 0 })[0]?.code).toBe('tenfold_jump');
    expect(entryWarnings({ newCases: 500, population: 1000, previousNewCases: null })).toEqual([]);
  });
});
