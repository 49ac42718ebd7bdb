/**
 * The merge desk (SYNC.md principle 5): open conflicts of an outbreak side by side, and their
 * settlement. A settlement writes a new version of the tally (it reaches every device through
 * pull), closes the conflict and appends a ledger row, all in one write transaction. A conflict
 * settled by someone else meanwhile, or a tally that moved since the desk showed it, is a 409.
 */
import { Op } from 'sequelize';
import { Conflict, Device, Site, Tally, User } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { AppError, notFound } from '@/lib/http/errors';
import type { ConflictRecord, TallyRecord } from '@/lib/types/records';
import type { SettleConflictInput } from '@/lib/validation/sync';
import { db, writeTx } from './connection';
import { nextChangeSeq } from './counters';
import { appendLedger } from './ledger';
import { toConflictRecord, toTallyRecord } from './tallies';

export { toConflictRecord };

const parse = (s: string | null): Record<string, unknown> | null => {
  if (!s) return null;
  try {
    const v = JSON.parse(s) as unknown;
    return v && typeof v === 'object' ? (v as Record<string, unknown>) : null;
  } catch {
    return null;
  }
};
/** One conflict as the desk shows it: both values, who, which device, when, and the tally as it is now. */
export interface ConflictView extends ConflictRecord {
  siteName: string | null;
  date: string | null;
  userName: string | null;
  deviceLabel: string | null;
  settledByName: string | null;
  /** The tally now (it may have moved since the conflict arose); null when missing. */
  live: TallyRecord | null;
  /** Who made the live version, and on which device. */
  liveByName: string | null;
  liveDeviceLabel: string | null;
}

/** Counts of a tally a settlement decides, people per day. */
export interface SettledValues {
  newCases: number;
  recoveries: number | null;
  deaths: number | null;
  admissions: number | null;
}

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function valuesOf(r: Record<string, unknown> | null): SettledValues | null {
  if (!r) return null;
  const newCases = num(r.newCases);
  if (newCases === null) return null;
  return { newCases, recoveries: num(r.recoveries), deaths: num(r.deaths), admissions: num(r.admissions) };
}

const addMaybe = (a: number | null, b: number | null) => (a === null && b === null ? null : (a ?? 0) + (b ?? 0));

/** Whether the incoming change of a conflict was a delete (a stale delete kept for the desk). */
function incomingIsDelete(incoming: Record<string, unknown>): boolean {
  return incoming.op === 'delete' || incoming.deleted === true || (incoming.deletedAt != null && incoming.newCases === undefined);
}

/**
 * What a settlement writes (pure, exported for tests): `null` values mean "the tally is deleted".
 * Sum adds every count; an unknown count on one side counts as 0 when the other side knows it.
 */
export function settledValues(
  settlement: SettleConflictInput['settlement'],
  current: SettledValues | null,
  incoming: SettledValues | null,
  corrected?: SettleConflictInput['corrected'],
): SettledValues | null {
  switch (settlement) {
    case 'keep_current':
      return current;
    case 'keep_incoming':
      return incoming;
    case 'sum':
      if (!current) return incoming;
      if (!incoming) return current;
      return {
        newCases: current.newCases + incoming.newCases,
        recoveries: addMaybe(current.recoveries, incoming.recoveries),
        deaths: addMaybe(current.deaths, incoming.deaths),
        admissions: addMaybe(current.admissions, incoming.admissions),
      };
    case 'corrected':
      if (!corrected) throw new AppError('validation_failed', 'Type the corrected count.', { fields: { 'corrected.newCases': 'Required.' } });
      return { newCases: corrected.newCases, recoveries: corrected.recoveries ?? null, deaths: corrected.deaths ?? null, admissions: corrected.admissions ?? null };
  }
}

/** Conflicts of an outbreak for the desk (coordinators: merge:settle), oldest first. */
export async function listConflicts(actor: Actor, outbreakId: string, status: 'open' | 'settled' | 'all' = 'open'): Promise<ConflictView[]> {
  authorize(actor, 'merge:settle', { outbreakId });
  await db();
  const rows = await Conflict.findAll({
    where: { outbreakId, ...(status === 'all' ? {} : { status }) },
    order: [['createdAt', status === 'settled' ? 'DESC' : 'ASC']],
    limit: 500,
  });
  const tallyIds = [...new Set(rows.map((r) => r.entityId))];
  const tallies = new Map((await Tally.findAll({ where: { id: { [Op.in]: tallyIds } } })).map((t) => [t.id, t]));
  const siteIds = new Set<string>();
  for (const r of rows) {
    const s = parse(r.incoming)?.siteId;
    if (typeof s === 'string') siteIds.add(s);
  }
  for (const t of tallies.values()) siteIds.add(t.siteId);
  const sites = new Map((await Site.findAll({ where: { id: { [Op.in]: [...siteIds] } }, attributes: ['id', 'name'] })).map((s) => [s.id, s.name]));
  const userIds = new Set<string>();
  const deviceIds = new Set<string>();
  for (const r of rows) {
    if (r.userId) userIds.add(r.userId);
    if (r.settledBy) userIds.add(r.settledBy);
    if (r.deviceId) deviceIds.add(r.deviceId);
  }
  for (const t of tallies.values()) {
    if (t.updatedBy) userIds.add(t.updatedBy);
    if (t.deviceId) deviceIds.add(t.deviceId);
  }
  const users = new Map((await User.findAll({ where: { id: { [Op.in]: [...userIds] } }, attributes: ['id', 'name'] })).map((u) => [u.id, u.name]));
  const devices = new Map((await Device.findAll({ where: { id: { [Op.in]: [...deviceIds] } }, attributes: ['id', 'label'] })).map((d) => [d.id, d.label]));
  return rows.map((r) => {
    const rec = toConflictRecord(r);
    const t = tallies.get(r.entityId);
    const siteId = t?.siteId ?? (typeof rec.incoming.siteId === 'string' ? rec.incoming.siteId : null);
    return {
      ...rec,
      siteName: siteId ? (sites.get(siteId) ?? null) : null,
      date: t?.date ?? (typeof rec.incoming.date === 'string' ? rec.incoming.date : null),
      userName: r.userId ? (users.get(r.userId) ?? null) : null,
      deviceLabel: r.deviceId ? (devices.get(r.deviceId) ?? null) : null,
      settledByName: r.settledBy ? (users.get(r.settledBy) ?? null) : null,
      live: t ? toTallyRecord(t) : null,
      liveByName: t?.updatedBy ? (users.get(t.updatedBy) ?? null) : null,
      liveDeviceLabel: t?.deviceId ? (devices.get(t.deviceId) ?? null) : null,
    };
  });
}

export interface SettleResult {
  conflict: ConflictRecord;
  tally: TallyRecord;
}

/**
 * Settles one conflict. Behind the write lock, so of two coordinators settling at once the second
 * finds the conflict settled (or its version moved) and gets a 409; nothing is overwritten.
 */
export async function settleConflict(actor: Actor, id: string, input: SettleConflictInput): Promise<SettleResult> {
  await db();
  return writeTx(async (t) => {
    const c = await Conflict.findByPk(id, { transaction: t });
    if (!c) throw notFound('Conflict');
    authorize(actor, 'merge:settle', { outbreakId: c.outbreakId });
    if (c.status !== 'open' || Number(c.version) !== input.conflictVersion) {
      throw new AppError('conflict', 'This conflict was settled by someone else meanwhile. Reload the merge desk to see how.', {
        detail: { reason: 'already_settled', status: c.status, version: Number(c.version), settledBy: c.settledBy },
      });
    }
    if (c.entity !== 'tally') throw new AppError('unprocessable', `Conflicts of ${c.entity} are not settled on this desk.`);
    const tally = await Tally.findByPk(c.entityId, { transaction: t });
    if (!tally) throw notFound('Tally');
    if (input.currentVersion !== null && Number(tally.version) !== input.currentVersion) {
      throw new AppError('conflict', `The tally changed since the desk showed it (now version ${tally.version}). Reload and settle again.`, {
        detail: { reason: 'version_moved', currentVersion: Number(tally.version) },
      });
    }
    const incoming = parse(c.incoming) ?? {};
    const current = tally.deletedAt ? null : valuesOf(toTallyRecord(tally) as unknown as Record<string, unknown>);
    const incomingValues = incomingIsDelete(incoming) ? null : valuesOf(incoming);
    const values = settledValues(input.settlement, current, incomingValues, input.corrected);
    const changeSeq = await nextChangeSeq(t);
    const now = new Date();
    try {
      await tally.update(
        {
          ...(values ?? {}),
          deletedAt: values ? null : (tally.deletedAt ?? now),
          version: Number(tally.version) + 1,
          changeSeq,
          updatedBy: actor.id,
          deviceId: null,
        },
        { transaction: t },
      );
    } catch (err) {
      if ((err as { name?: string }).name === 'SequelizeUniqueConstraintError') {
        throw new AppError('conflict', 'Another live tally holds this site and day now; settle that one instead.', { detail: { reason: 'site_day_taken' } });
      }
      throw err;
    }
    const [n] = await Conflict.update(
      { status: 'settled', settlement: input.settlement, settledBy: actor.id, settledAt: now, settleReason: input.reason, version: Number(c.version) + 1 },
      { where: { id: c.id, status: 'open', version: input.conflictVersion }, transaction: t },
    );
    if (n !== 1) throw new AppError('conflict', 'This conflict was settled by someone else meanwhile.', { detail: { reason: 'already_settled' } });
    await appendLedger(t, {
      kind: 'settlement', userId: actor.id, outbreakId: c.outbreakId,
      detail: {
        conflictId: c.id, tallyId: tally.id, settlement: input.settlement, reason: input.reason,
        version: Number(tally.version), values, conflictReason: c.reason,
      },
    });
    await c.reload({ transaction: t });
    return { conflict: toConflictRecord(c), tally: toTallyRecord(tally) };
  });
}
