/**
 * The conflict rules for tallies (SYNC.md principles 5 and 6), as one pure decision the server's
 * data layer (lib/db/tallies.ts) calls inside its write transaction. No database, no clock: the
 * caller loads the current record and passes what it found.
 *
 * The server's current value is never overwritten by a change made without seeing it: such a
 * change becomes a Conflict row for the merge desk, and the current value stays.
 */

/** The values of a tally a person can disagree about (site and day are its identity). */
export interface TallyValues {
  /** People, per day. */
  newCases: number;
  recoveries: number | null;
  deaths: number | null;
  admissions: number | null;
  note: string | null;
}

/** What the server holds for the record in question. */
export interface CurrentTally {
  version: number;
  /** True for a tombstone (SYNC.md principle 6). */
  deleted: boolean;
  /** The device of the last change; null for changes made on the web (no device identity). */
  deviceId: string | null;
  values: TallyValues;
}

export type TallyConflictReason = 'duplicate_day' | 'stale_version' | 'edit_deleted';

export type TallyDecision =
  | { action: 'insert' }
  | { action: 'update' }
  | { action: 'delete' }
  | { action: 'unchanged' }
  | { action: 'conflict'; reason: TallyConflictReason };

const norm = (v: number | null | undefined) => (v === undefined ? null : v);
const normNote = (s: string | null | undefined) => {
  const t = (s ?? '').trim();
  return t === '' ? null : t;
};

/** The values with absent optional counts and blank notes made explicit, so equal means equal. */
export function normaliseValues(v: { newCases: number; recoveries?: number | null; deaths?: number | null; admissions?: number | null; note?: string | null }): TallyValues {
  return { newCases: v.newCases, recoveries: norm(v.recoveries), deaths: norm(v.deaths), admissions: norm(v.admissions), note: normNote(v.note) };
}

export function sameValues(a: TallyValues, b: TallyValues): boolean {
  return a.newCases === b.newCases && a.recoveries === b.recoveries && a.deaths === b.deaths && a.admissions === b.admissions && a.note === b.note;
}

/**
 * A device's own last write is the base of its next one: when the current version was written by
 * the same (non-null) device, no one else has changed the record since, so a stale or missing
 * baseVersion only means the device queued two edits before hearing back. Treating that as a
 * conflict would send a person's own corrections to the merge desk.
 */
const ownLastWrite = (current: CurrentTally, deviceId: string | null) => deviceId !== null && current.deviceId === deviceId;

/**
 * Decides an upsert.
 * - `byId`: the record with the incoming id (live or tombstone), or null.
 * - `sameDay`: the live tally of the same site and day with another id, or null.
 */
export function decideTallyUpsert(
  incoming: { baseVersion: number | null; deviceId: string | null; values: TallyValues },
  byId: CurrentTally | null,
  sameDay: CurrentTally | null,
): TallyDecision {
  if (byId) {
    // Editing a record another device deleted: resurrecting it would silently undo that delete,
    // and dropping the edit would lose a count; the coordinator decides.
    if (byId.deleted) return { action: 'conflict', reason: 'edit_deleted' };
    // The same values again (a retried create, two people typing the same count) is agreement,
    // not a disagreement; nothing changes and no version is spent.
    if (sameValues(byId.values, incoming.values)) return { action: 'unchanged' };
    if (incoming.baseVersion === byId.version || ownLastWrite(byId, incoming.deviceId)) return { action: 'update' };
    // Made without seeing the current version (an older one, or none at all): the current value
    // stays and the incoming one waits on the merge desk.
    return { action: 'conflict', reason: 'stale_version' };
  }
  if (sameDay) {
    // Two records for one site and day (two devices, each creating offline): the unique live
    // index allows one; identical counts are agreement, different ones go to the merge desk
    // (keep one, keep the other, or sum them — only a person knows whether they overlap).
    if (sameValues(sameDay.values, incoming.values)) return { action: 'unchanged' };
    return { action: 'conflict', reason: 'duplicate_day' };
  }
  return { action: 'insert' };
}

/** Decides a delete of the record `current` (live or tombstone). */
export function decideTallyDelete(incoming: { baseVersion: number | null; deviceId: string | null }, current: CurrentTally): TallyDecision {
  // Already deleted: both sides want it gone, which is agreement; a conflict row here would give
  // the merge desk a question with only one answer.
  if (current.deleted) return { action: 'unchanged' };
  if (incoming.baseVersion === current.version || ownLastWrite(current, incoming.deviceId)) return { action: 'delete' };
  // A delete of a version the device never saw: someone corrected the count meanwhile, and the
  // delete may no longer be wanted; keep the record and ask.
  return { action: 'conflict', reason: 'stale_version' };
}
