/**
 * Saved scenarios of an outbreak (server side). Every function authorizes its actor:
 * scenario:read to list and read, scenario:write to save and delete, forecast:publish to make or
 * unmake the official forecast (and to change or delete the one that is official).
 *
 * Write functions take an optional transaction `t` so that the sync push can apply a scenario
 * mutation inside its own batch transaction; without `t` they open a write transaction of their own.
 */
import { randomUUID } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { Outbreak, Scenario } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { conflict, notFound } from '@/lib/http/errors';
import type { ScenarioRecord } from '@/lib/types/records';
import type { ScenarioRecordInput } from '@/lib/validation/scenario-record';
import { sendInBackground } from '@/lib/mail/transport';
import { checkCapacityAlert } from './alerts';
import { db, writeTx } from './connection';
import { nextChangeSeq } from './counters';
import { appendLedger } from './ledger';
import { syncMeta } from './mappers';

export interface ScenarioWriteContext {
  /** The installation that made the change (SYNC.md); null for a plain online call. */
  deviceId: string | null;
  /** The server version the change was based on; absent for a new scenario or an overwrite. */
  baseVersion?: number;
}

export type ScenarioUpsert = Omit<ScenarioRecordInput, 'baseVersion'> & { outbreakId: string };

const parse = (s: string | null): unknown => {
  if (s == null) return null;
  try {
    return JSON.parse(s);
  } catch {
    return null;
  }
};

export const toScenarioRecord = (s: Scenario): ScenarioRecord => ({
  ...syncMeta(s),
  outbreakId: s.outbreakId,
  name: s.name,
  input: parse(s.input),
  official: Boolean(s.official),
  notes: parse(s.notes),
});

/** Runs fn in the caller's transaction, or in a write transaction of its own. Never nests writeTx. */
const inTx = <T>(t: Transaction | undefined, fn: (t: Transaction) => Promise<T>): Promise<T> => (t ? fn(t) : writeTx(fn));

/**
 * Runs the capacity alert (lib/db/alerts.ts) for the outbreak once the write is committed: never
 * inside it, since a mail send would hold the one SQLite write lock, and the check reads only
 * committed rows. In the caller's transaction (the sync push) it waits for that transaction's
 * outermost commit; the hook runs while the lock is still held, so it only starts the check.
 * The check runs in the background (tests wait with settleMail()); its failure (mail down) is
 * logged and never fails or undoes the write. A forecast already alerted is not alerted again
 * (alerts.ts); Sequelize runs afterCommit hooks even after a failed commit, which is harmless here.
 */
function alertAfterCommit(outbreakId: string, t: Transaction | undefined): void {
  const start = () =>
    sendInBackground(() =>
      checkCapacityAlert(outbreakId).catch((err: unknown) => {
        console.error(`capacity alert for outbreak ${outbreakId} failed after publishing:`, err instanceof Error ? err.message : err);
      }),
    );
  if (!t) return start();
  // A savepoint's afterCommit fires when the savepoint is released, before the batch commits.
  type Nested = Transaction & { parent?: Transaction };
  let root = t as Nested;
  while (root.parent) root = root.parent as Nested;
  root.afterCommit(start);
}

/** Live scenarios of an outbreak, the official one first, then the newest. */
export async function listScenarios(actor: Actor, outbreakId: string): Promise<ScenarioRecord[]> {
  authorize(actor, 'scenario:read', { outbreakId });
  await db();
  const rows = await Scenario.findAll({
    where: { outbreakId, deletedAt: null },
    order: [['official', 'DESC'], ['updatedAt', 'DESC']],
  });
  return rows.map(toScenarioRecord);
}

/** One live scenario; 404 when missing or deleted, 403 outside the actor's outbreaks. */
export async function getScenario(actor: Actor, id: string): Promise<ScenarioRecord> {
  await db();
  const s = await Scenario.findByPk(id);
  if (!s || s.deletedAt) throw notFound('Scenario');
  authorize(actor, 'scenario:read', { outbreakId: s.outbreakId });
  return toScenarioRecord(s);
}

function checkBase(existing: Scenario, ctx: ScenarioWriteContext): void {
  if (ctx.baseVersion !== undefined && ctx.baseVersion !== Number(existing.version)) {
    throw conflict(
      `The scenario was changed elsewhere (now version ${existing.version}, this change was based on ${ctx.baseVersion}). Reload it and try again.`,
      { currentVersion: Number(existing.version) },
    );
  }
}

/** Clears `official` on every other live scenario of the outbreak (each one a new version). */
async function clearOtherOfficial(actor: Actor, outbreakId: string, keepId: string, ctx: ScenarioWriteContext, t: Transaction) {
  const others = await Scenario.findAll({
    where: { outbreakId, official: true, deletedAt: null, id: { [Op.ne]: keepId } },
    transaction: t,
  });
  for (const o of others) {
    await o.update(
      { official: false, version: Number(o.version) + 1, changeSeq: await nextChangeSeq(t), updatedBy: actor.id, deviceId: ctx.deviceId },
      { transaction: t },
    );
  }
}

/**
 * Creates or updates a scenario (by `input.id`; a new id when absent). Refuses with 409 when
 * `ctx.baseVersion` is stale, when the id belongs to another outbreak, or when the scenario was
 * deleted. `official: true` needs forecast:publish and unsets the outbreak's previous official
 * forecast in the same transaction; changing the official scenario needs forecast:publish too.
 */
export async function upsertScenario(
  actor: Actor,
  input: ScenarioUpsert,
  ctx: ScenarioWriteContext,
  t?: Transaction,
): Promise<ScenarioRecord> {
  authorize(actor, 'scenario:write', { outbreakId: input.outbreakId });
  if (input.official) authorize(actor, 'forecast:publish', { outbreakId: input.outbreakId });
  await db();
  const saved = await inTx(t, async (tx) => {
    if (!(await Outbreak.findByPk(input.outbreakId, { transaction: tx }))) throw notFound('Outbreak');
    const id = input.id ?? randomUUID();
    const existing = await Scenario.findByPk(id, { transaction: tx });
    const fields = {
      name: input.name,
      input: JSON.stringify(input.input),
      notes: input.notes == null ? null : JSON.stringify(input.notes),
      updatedBy: actor.id,
      deviceId: ctx.deviceId,
    };
    let row: Scenario;
    if (existing) {
      if (existing.outbreakId !== input.outbreakId) throw conflict('This scenario id belongs to another outbreak.');
      if (existing.deletedAt) throw conflict('This scenario was deleted.', { currentVersion: Number(existing.version) });
      checkBase(existing, ctx);
      if (existing.official) authorize(actor, 'forecast:publish', { outbreakId: input.outbreakId });
      const official = input.official ?? Boolean(existing.official);
      row = await existing.update(
        { ...fields, official, version: Number(existing.version) + 1, changeSeq: await nextChangeSeq(tx) },
        { transaction: tx },
      );
    } else {
      if (ctx.baseVersion !== undefined) throw notFound('Scenario');
      row = await Scenario.create(
        { ...fields, id, outbreakId: input.outbreakId, official: Boolean(input.official), version: 1, changeSeq: await nextChangeSeq(tx) },
        { transaction: tx },
      );
    }
    if (input.official) {
      await clearOtherOfficial(actor, input.outbreakId, id, ctx, tx);
      await appendLedger(tx, { kind: 'forecast.publish', userId: actor.id, deviceId: ctx.deviceId, outbreakId: input.outbreakId, detail: { scenarioId: id, name: input.name } });
    }
    return row;
  });
  // An edit of the official forecast (or a new one published) may cross the beds.
  if (saved.official) alertAfterCommit(saved.outbreakId, t);
  return toScenarioRecord(saved);
}

/** Tombstones a scenario (nothing synced is physically deleted). The official one needs forecast:publish. */
export async function deleteScenario(actor: Actor, id: string, ctx: ScenarioWriteContext, t?: Transaction): Promise<ScenarioRecord> {
  await db();
  const row = await inTx(t, async (tx) => {
    const s = await Scenario.findByPk(id, { transaction: tx });
    if (!s || s.deletedAt) throw notFound('Scenario');
    authorize(actor, 'scenario:write', { outbreakId: s.outbreakId });
    if (s.official) authorize(actor, 'forecast:publish', { outbreakId: s.outbreakId });
    checkBase(s, ctx);
    return s.update(
      { deletedAt: new Date(), official: false, version: Number(s.version) + 1, changeSeq: await nextChangeSeq(tx), updatedBy: actor.id, deviceId: ctx.deviceId },
      { transaction: tx },
    );
  });
  return toScenarioRecord(row);
}

/** Makes a scenario the outbreak's official forecast (at most one), or withdraws it. forecast:publish. */
export async function setOfficial(
  actor: Actor,
  id: string,
  official: boolean,
  ctx: ScenarioWriteContext = { deviceId: null },
  t?: Transaction,
): Promise<ScenarioRecord> {
  await db();
  const row = await inTx(t, async (tx) => {
    const s = await Scenario.findByPk(id, { transaction: tx });
    if (!s || s.deletedAt) throw notFound('Scenario');
    authorize(actor, 'forecast:publish', { outbreakId: s.outbreakId });
    checkBase(s, ctx);
    if (Boolean(s.official) === official) return s;
    if (official) await clearOtherOfficial(actor, s.outbreakId, s.id, ctx, tx);
    const updated = await s.update(
      { official, version: Number(s.version) + 1, changeSeq: await nextChangeSeq(tx), updatedBy: actor.id, deviceId: ctx.deviceId },
      { transaction: tx },
    );
    await appendLedger(tx, {
      kind: official ? 'forecast.publish' : 'forecast.withdraw',
      userId: actor.id, deviceId: ctx.deviceId, outbreakId: s.outbreakId, detail: { scenarioId: s.id, name: s.name },
    });
    return updated;
  });
  // Also when it was official already: the check is idempotent and retries an alert that failed.
  if (row.official) alertAfterCommit(row.outbreakId, t);
  return toScenarioRecord(row);
}
