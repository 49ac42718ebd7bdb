/**
 * The server side of sync (SYNC.md): device registration, the idempotent push and the cursor
 * pull. Push applies each mutation through the entity's own data function (lib/db/tallies.ts,
 * lib/db/scenarios.ts) with the batch's transaction passed in, so the rules live in one place.
 */
import { Op, QueryTypes, type Transaction, type WhereOptions } from 'sequelize';
import { AppliedMutation, Device, Outbreak, Scenario, Site, Tally, Team } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize, may } from '@/lib/auth/permissions';
import { AppError, forbidden } from '@/lib/http/errors';
import type { Change, Mutation, PullEntity, PullResponse, PushResponse, PushResult } from '@/lib/sync/protocol';
import type { DeviceRegisterInput, PushBody } from '@/lib/validation/sync';
import { DEFAULT_PULL_LIMIT, MAX_PULL_LIMIT } from '@/lib/validation/sync';
import { tallyInputSchema } from '@/lib/validation/tally';
import { scenarioRecordInputSchema } from '@/lib/validation/scenario-record';
import { uuidSchema } from '@/lib/validation/common';
import { db, writeTx } from './connection';
import { appendLedger } from './ledger';
import { toOutbreakRecord, toSiteRecord, toTeamRecord } from './outbreaks';
import { deleteTally, latestAcceptedDay, toTallyRecord, upsertTally } from './tallies';
import { reserveChangeSeqs } from './counters';
import { normaliseValues } from '@/lib/sync/tally-rules';
import type { TallyInput } from '@/lib/validation/tally';
import { deleteScenario, toScenarioRecord, upsertScenario } from './scenarios';

export interface DeviceRecord {
  id: string;
  userId: string;
  label: string;
  lastSeenAt: string | null;
  highestSeq: number;
}

const toDeviceRecord = (d: Device): DeviceRecord => ({
  id: d.id, userId: d.userId, label: d.label,
  lastSeenAt: d.lastSeenAt ? new Date(d.lastSeenAt).toISOString() : null,
  highestSeq: Number(d.highestSeq),
});

/**
 * Registers this installation for the signed-in user, or renames it. A device id already
 * registered to someone else is refused (403): its outbox belongs to that person.
 */
export async function registerDevice(actor: Actor, input: DeviceRegisterInput): Promise<DeviceRecord> {
  authorize(actor, 'sync:pull');
  const d = await writeTx(async (t) => {
    const existing = await Device.findByPk(input.id, { transaction: t });
    if (existing) {
      if (existing.userId !== actor.id) throw forbidden('this device (it is registered to another user)');
      return existing.update({ label: input.label, lastSeenAt: new Date() }, { transaction: t });
    }
    const created = await Device.create({ id: input.id, userId: actor.id, label: input.label, lastSeenAt: new Date(), highestSeq: 0 }, { transaction: t });
    await appendLedger(t, { kind: 'device.register', userId: actor.id, deviceId: input.id, detail: { label: input.label } });
    return created;
  });
  return toDeviceRecord(d);
}

/** The signed-in user's devices; coordinators and supervisors also see the devices that pushed to their outbreaks (labels for the desk). */
export async function listDevices(actor: Actor): Promise<DeviceRecord[]> {
  await db();
  const where: WhereOptions = actor.role === 'field' ? { userId: actor.id } : {};
  return (await Device.findAll({ where, order: [['label', 'ASC']] })).map(toDeviceRecord);
}

type Counts = { applied: number; duplicate: number; conflict: number; rejected: number; resent: number };

/**
 * Applies one batch in one write transaction: every mutation is recorded with its answer, or
 * none is (a seq gap or a server error rolls the whole batch back). A mutation already recorded
 * gets its stored answer again and changes nothing.
 */
export async function pushMutations(actor: Actor, body: PushBody): Promise<PushResponse> {
  authorize(actor, 'sync:push');
  await db();
  const started = performance.now();
  return writeTx(async (t) => {
    // Both reads at once: they queue on the one connection, so their round trips overlap.
    const [device, prior] = await Promise.all([
      Device.findByPk(body.deviceId, { transaction: t }),
      body.mutations.length ? AppliedMutation.findAll({ where: { mutationId: { [Op.in]: body.mutations.map((m) => m.mutationId) } }, transaction: t }) : [],
    ]);
    if (!device) throw new AppError('not_found', 'This device is not registered yet; register it, then push again.', { detail: { reason: 'device_unknown' } });
    if (device.userId !== actor.id) throw forbidden('this device (it is registered to another user)');
    const known = new Map<string, AppliedMutation>(prior.map((r) => [r.mutationId, r]));
    let highest = Number(device.highestSeq);
    const counts: Counts = { applied: 0, duplicate: 0, conflict: 0, rejected: 0, resent: 0 };
    const results: (PushResult | null)[] = [];
    const outbreakIds = new Set<string>();
    // First the seq rule over the whole batch, before anything is written.
    const fresh: Mutation[] = [];
    for (const m of body.mutations) {
      const prior = known.get(m.mutationId);
      if (prior) {
        if (prior.deviceId !== device.id || Number(prior.seq) !== m.seq) {
          throw new AppError('conflict', `Mutation ${m.mutationId} was recorded before with another device or seq.`, { detail: { reason: 'mutation_reused' } });
        }
        results.push(JSON.parse(prior.result) as PushResult);
        counts.resent++;
        continue;
      }
      const expectedSeq = highest + 1;
      if (m.seq !== expectedSeq) {
        throw new AppError(
          'conflict',
          m.seq > expectedSeq
            ? `Mutations are missing before seq ${m.seq}: the server expects seq ${expectedSeq} next. Send the outbox again from there.`
            : `Seq ${m.seq} was already used by another mutation of this device; the server expects seq ${expectedSeq} next.`,
          { detail: { reason: m.seq > expectedSeq ? 'seq_gap' : 'seq_reused', expectedSeq, seq: m.seq } },
        );
      }
      fresh.push(m);
      results.push(null);
      highest = m.seq;
    }
    const answers = new Map<string, Applied>();
    for (const [id, a] of await applyPlainInserts(actor, device.id, fresh, t)) answers.set(id, a);
    for (const m of fresh) {
      if (answers.has(m.mutationId)) continue;
      const a = await applyOne(actor, device.id, m, t);
      answers.set(m.mutationId, a);
      if (a.result.fate === 'conflict') {
        await appendLedger(t, {
          kind: 'conflict', userId: actor.id, deviceId: device.id, outbreakId: a.outbreakId,
          detail: { conflictId: a.result.conflictId, entity: m.entity, entityId: m.entityId, reason: a.result.reason, mutationId: m.mutationId },
        });
      }
    }
    const appliedAt = new Date();
    const rows = fresh.map((m) => {
      const { result, outbreakId } = answers.get(m.mutationId)!;
      if (outbreakId) outbreakIds.add(outbreakId);
      counts[result.fate]++;
      return {
        mutationId: m.mutationId, deviceId: device.id, seq: m.seq, entity: m.entity, entityId: m.entityId,
        fate: result.fate, reason: result.reason ?? null, result: JSON.stringify(result), appliedAt,
      };
    });
    const qi = (await db()).getQueryInterface();
    let k = 0;
    for (let i = 0; i < results.length; i++) if (results[i] === null) results[i] = answers.get(fresh[k++]!.mutationId)!.result;
    const only = outbreakIds.size === 1 ? [...outbreakIds][0]! : null;
    // The batch's three closing writes are independent: issued together, they queue on the one
    // connection in this order and their round trips overlap (the duration is taken before them).
    await Promise.all([
      (async () => {
        for (let i = 0; i < rows.length; i += 500) await qi.bulkInsert('applied_mutations', rows.slice(i, i + 500).map(snakeRow), { transaction: t });
      })(),
      device.update({ highestSeq: highest, lastSeenAt: new Date() }, { transaction: t }),
      appendLedger(t, {
        kind: 'push', userId: actor.id, deviceId: device.id, outbreakId: only,
        counts: { mutations: body.mutations.length, ...counts },
        durationMs: performance.now() - started,
        detail: {
          firstSeq: body.mutations[0]?.seq ?? null, lastSeq: body.mutations.at(-1)?.seq ?? null,
          ...(outbreakIds.size > 1 ? { outbreakIds: [...outbreakIds] } : {}),
        },
      }),
    ]);
    return { results: results as PushResult[], highestSeq: highest };
  });
}

const snakeRow = (r: Record<string, unknown>) => Object.fromEntries(Object.entries(r).map(([k, v]) => [k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`), v]));

interface Applied {
  result: PushResult;
  outbreakId: string | null;
}

/**
 * The common case of a batch, in bulk: new tallies (no base version) of a site and day nobody
 * has recorded, by someone allowed to write that site, on a valid day. For exactly these,
 * upsertTally's rules (lib/sync/tally-rules.ts) decide "insert" and its insert writes the row
 * below; doing them together takes a few statements per batch instead of about ten per
 * mutation. Everything else — an edit, a delete, a second mutation of the same record or day in
 * the batch, anything that upsertTally would refuse or turn into a conflict — goes through
 * upsertTally itself. tests/integration/sync-protocol.test.ts checks that both paths write the same record.
 */
async function applyPlainInserts(actor: Actor, deviceId: string, muts: Mutation[], t: Transaction): Promise<Map<string, Applied>> {
  const out = new Map<string, Applied>();
  const entityCount = new Map<string, number>();
  const dayCount = new Map<string, number>();
  const parsed = new Map<string, TallyInput>();
  for (const m of muts) {
    entityCount.set(m.entityId, (entityCount.get(m.entityId) ?? 0) + 1);
    if (m.entity !== 'tally' || m.op !== 'upsert') continue;
    const p = tallyInputSchema.safeParse({ ...(m.payload ?? {}), id: m.entityId, baseVersion: null });
    if (!p.success) continue;
    parsed.set(m.mutationId, p.data);
    const key = `${p.data.siteId}|${p.data.date}`;
    dayCount.set(key, (dayCount.get(key) ?? 0) + 1);
  }
  const candidates = muts.filter((m) => {
    const p = parsed.get(m.mutationId);
    return p && m.baseVersion === null && entityCount.get(m.entityId) === 1 && dayCount.get(`${p.siteId}|${p.date}`) === 1;
  });
  if (candidates.length < 2) return out;
  const siteIds = [...new Set(candidates.map((m) => parsed.get(m.mutationId)!.siteId))];
  const sites = new Map((await Site.findAll({ where: { id: { [Op.in]: siteIds } }, attributes: ['id', 'outbreakId', 'teamId', 'deletedAt'], transaction: t })).map((x) => [x.id, x]));
  const outbreaks = new Map(
    (await Outbreak.findAll({ where: { id: { [Op.in]: [...new Set([...sites.values()].map((x) => x.outbreakId))] } }, attributes: ['id', 'startDate', 'deletedAt'], transaction: t })).map((o) => [o.id, o]),
  );
  const taken = new Set((await Tally.findAll({ where: { id: { [Op.in]: candidates.map((m) => m.entityId) } }, attributes: ['id'], transaction: t })).map((x) => x.id));
  const dates = [...new Set(candidates.map((m) => parsed.get(m.mutationId)!.date))];
  const liveDays = new Set(
    (await Tally.findAll({ where: { siteId: { [Op.in]: siteIds }, date: { [Op.in]: dates }, deletedAt: null }, attributes: ['siteId', 'date'], transaction: t })).map((x) => `${x.siteId}|${x.date}`),
  );
  const latest = latestAcceptedDay();
  const plain = candidates.filter((m) => {
    const p = parsed.get(m.mutationId)!;
    const site = sites.get(p.siteId);
    const outbreak = site && outbreaks.get(site.outbreakId);
    return site && !site.deletedAt && outbreak && !outbreak.deletedAt && !taken.has(m.entityId) && !liveDays.has(`${p.siteId}|${p.date}`)
      && may(actor, 'tally:write', { outbreakId: site.outbreakId, teamId: site.teamId })
      && p.date <= latest && p.date >= String(outbreak.startDate);
  });
  if (!plain.length) return out;
  const first = await reserveChangeSeqs(t, plain.length);
  const now = new Date();
  const rows = plain.map((m, i) => {
    const p = parsed.get(m.mutationId)!;
    return {
      id: m.entityId, outbreakId: sites.get(p.siteId)!.outbreakId, siteId: p.siteId, date: p.date, ...normaliseValues(p),
      version: 1, changeSeq: first + i, updatedBy: actor.id, deviceId, recordedBy: actor.id, recordedAt: new Date(m.recordedAt),
      createdAt: now, updatedAt: now,
    };
  });
  // Straight to the table (no model instances): the rows are complete and already checked.
  const q = (await db()).getQueryInterface();
  for (let i = 0; i < rows.length; i += 500) {
    await q.bulkInsert('tallies', rows.slice(i, i + 500).map(snakeRow), { transaction: t });
  }
  rows.forEach((row, i) => {
    const m = plain[i]!;
    out.set(m.mutationId, { result: { mutationId: m.mutationId, fate: 'applied', record: { ...toTallyRecord({ ...row, deletedAt: null } as unknown as Tally) } }, outbreakId: row.outbreakId });
  });
  return out;
}

/**
 * One mutation inside a savepoint: an expected refusal (scope, validation, a missing record) rolls
 * back only this mutation's writes and answers `rejected`; anything unexpected aborts the batch.
 */
async function applyOne(actor: Actor, deviceId: string, m: Mutation, t: Transaction): Promise<Applied> {
  const sequelize = await db();
  try {
    return await sequelize.transaction({ transaction: t }, (sp) => applyEntity(actor, deviceId, m, sp));
  } catch (err) {
    if (err instanceof AppError && err.status < 500) {
      const current = await visibleRecord(actor, m.entity, m.entityId, t);
      return {
        result: { mutationId: m.mutationId, fate: 'rejected', reason: rejectReason(err), record: current?.record ?? null },
        outbreakId: current?.outbreakId ?? null,
      };
    }
    throw err;
  }
}

function rejectReason(err: AppError): string {
  const r = (err.detail as { reason?: unknown } | undefined)?.reason;
  if (typeof r === 'string') return r;
  if (err.code === 'conflict') return 'stale_version';
  return err.code;
}

const reject = (m: Mutation, reason: string): Applied => ({ result: { mutationId: m.mutationId, fate: 'rejected', reason, record: null }, outbreakId: null });

async function applyEntity(actor: Actor, deviceId: string, m: Mutation, t: Transaction): Promise<Applied> {
  if (m.entity === 'tally') return applyTally(actor, deviceId, m, t);
  if (m.entity === 'scenario') return applyScenario(actor, deviceId, m, t);
  return reject(m, 'entity_not_supported');
}

async function applyTally(actor: Actor, deviceId: string, m: Mutation, t: Transaction): Promise<Applied> {
  const ctx = { deviceId, mutationId: m.mutationId, recordedAt: new Date(m.recordedAt), baseVersion: m.baseVersion };
  if (m.op === 'delete') {
    const r = await deleteTally(actor, m.entityId, ctx, t);
    return { result: fromTallyOutcome(m, r), outbreakId: r.tally?.outbreakId ?? null };
  }
  const parsed = tallyInputSchema.safeParse({ ...(m.payload ?? {}), id: m.entityId, baseVersion: m.baseVersion });
  if (!parsed.success) {
    throw new AppError('validation_failed', 'The tally is not valid.', { detail: { reason: 'validation_failed' } });
  }
  const r = await upsertTally(actor, parsed.data, ctx, t);
  return { result: fromTallyOutcome(m, r), outbreakId: r.tally?.outbreakId ?? null };
}

function fromTallyOutcome(
  m: Mutation,
  r: { status: 'applied' | 'unchanged' | 'conflict'; tally?: unknown; conflict?: { id: string; reason?: string } | null },
): PushResult {
  const record = (r.tally ?? null) as Record<string, unknown> | null;
  if (r.status === 'applied') return { mutationId: m.mutationId, fate: 'applied', record };
  if (r.status === 'unchanged') return { mutationId: m.mutationId, fate: 'duplicate', reason: 'same_values', record };
  return { mutationId: m.mutationId, fate: 'conflict', reason: r.conflict?.reason ?? 'conflict', record, conflictId: r.conflict?.id };
}

const scenarioPayloadSchema = scenarioRecordInputSchema.omit({ baseVersion: true, id: true }).extend({ outbreakId: uuidSchema });

async function applyScenario(actor: Actor, deviceId: string, m: Mutation, t: Transaction): Promise<Applied> {
  const current = await Scenario.findByPk(m.entityId, { transaction: t });
  // A device's own last write is the base of its next one (the same rule as tallies).
  const own = current && current.deviceId === deviceId;
  const base = own ? Number(current.version) : (m.baseVersion ?? undefined);
  if (m.op === 'delete') {
    if (!current) throw new AppError('not_found', 'Scenario was not found.', { detail: { reason: 'not_found' } });
    authorize(actor, 'scenario:read', { outbreakId: current.outbreakId });
    if (current.deletedAt) return { result: { mutationId: m.mutationId, fate: 'duplicate', reason: 'already_deleted', record: { ...toScenarioRecord(current) } }, outbreakId: current.outbreakId };
    const rec = await deleteScenario(actor, m.entityId, { deviceId, baseVersion: base }, t);
    return { result: { mutationId: m.mutationId, fate: 'applied', record: { ...rec } }, outbreakId: rec.outbreakId };
  }
  const parsed = scenarioPayloadSchema.safeParse(m.payload ?? {});
  if (!parsed.success) throw new AppError('validation_failed', 'The scenario is not valid.', { detail: { reason: 'validation_failed' } });
  const rec = await upsertScenario(actor, { ...parsed.data, id: m.entityId }, { deviceId, baseVersion: current ? base : undefined }, t);
  return { result: { mutationId: m.mutationId, fate: 'applied', record: { ...rec } }, outbreakId: rec.outbreakId };
}

/** The server's record of an entity when the actor may read it (sent with a rejection so the device can put it back). */
async function visibleRecord(actor: Actor, entity: string, id: string, t: Transaction): Promise<{ record: Record<string, unknown>; outbreakId: string } | null> {
  if (entity === 'tally') {
    const row = await Tally.findByPk(id, { transaction: t });
    if (!row) return null;
    const site = await Site.findByPk(row.siteId, { transaction: t });
    if (!may(actor, 'tally:read', { outbreakId: row.outbreakId, teamId: site?.teamId ?? null })) return null;
    return { record: { ...toTallyRecord(row) }, outbreakId: row.outbreakId };
  }
  if (entity === 'scenario') {
    const row = await Scenario.findByPk(id, { transaction: t });
    if (!row || !may(actor, 'scenario:read', { outbreakId: row.outbreakId })) return null;
    return { record: { ...toScenarioRecord(row) }, outbreakId: row.outbreakId };
  }
  return null;
}

const PULL_TABLES: { entity: PullEntity; table: string; scope: 'id' | 'outbreak' | 'site' | 'tally' }[] = [
  { entity: 'outbreak', table: 'outbreaks', scope: 'id' },
  { entity: 'team', table: 'teams', scope: 'outbreak' },
  { entity: 'site', table: 'sites', scope: 'site' },
  { entity: 'tally', table: 'tallies', scope: 'tally' },
  { entity: 'scenario', table: 'scenarios', scope: 'outbreak' },
];

/**
 * The keys of the next changes after `after` the actor may see, in one statement: each table's
 * first `limit` rows by change_seq (an index walk), merged. Field officers see their teams' sites
 * and those sites' tallies only; tombstones are included. Plain SQL that SQLite and PostgreSQL share.
 */
async function nextKeys(actor: Actor, after: number, limit: number): Promise<{ entity: PullEntity; id: string; change_seq: number }[]> {
  const sequelize = await db();
  const field = actor.role === 'field';
  if (!actor.outbreakIds.length) return [];
  const where = (scope: (typeof PULL_TABLES)[number]['scope']) => {
    const inOutbreak = scope === 'id' ? 'id IN (:outbreakIds)' : 'outbreak_id IN (:outbreakIds)';
    if (!field) return inOutbreak;
    if (scope === 'site') return `${inOutbreak} AND team_id IN (:teamIds)`;
    if (scope === 'tally') return `${inOutbreak} AND site_id IN (SELECT id FROM sites WHERE team_id IN (:teamIds))`;
    return inOutbreak;
  };
  const parts = PULL_TABLES.map(
    (p, i) => `SELECT * FROM (SELECT '${p.entity}' AS entity, id, change_seq FROM ${p.table} WHERE change_seq > :after AND ${where(p.scope)} ORDER BY change_seq LIMIT :limit) AS p${i}`,
  );
  const sql = `SELECT entity, id, change_seq FROM (${parts.join(' UNION ALL ')}) AS u ORDER BY change_seq LIMIT :limit`;
  const rows = await sequelize.query<{ entity: PullEntity; id: string; change_seq: number | string }>(sql, {
    type: QueryTypes.SELECT,
    replacements: { after, limit, outbreakIds: actor.outbreakIds, teamIds: actor.teamIds.length ? actor.teamIds : ['-'] },
  });
  return rows.map((r) => ({ entity: r.entity, id: r.id, change_seq: Number(r.change_seq) }));
}

async function loadChanges(keys: { entity: PullEntity; id: string }[]): Promise<Change[]> {
  const ids = (e: PullEntity) => keys.filter((k) => k.entity === e).map((k) => k.id);
  const byKey = new Map<string, Change['record']>();
  const load = async <M extends { id: string }>(e: PullEntity, finder: (ids: string[]) => Promise<M[]>, map: (m: M) => object) => {
    const list = ids(e);
    if (!list.length) return;
    for (const m of await finder(list)) byKey.set(`${e}:${m.id}`, { ...map(m) } as Change['record']);
  };
  // Plain rows (no model instances: a page holds thousands); the mappers read only attributes.
  const where = (list: string[]) => ({ where: { id: { [Op.in]: list } }, raw: true });
  await load('outbreak', (l) => Outbreak.findAll(where(l)), toOutbreakRecord);
  await load('team', (l) => Team.findAll(where(l)), toTeamRecord);
  await load('site', (l) => Site.findAll(where(l)), toSiteRecord);
  await load('tally', (l) => Tally.findAll(where(l)), toTallyRecord);
  await load('scenario', (l) => Scenario.findAll(where(l)), toScenarioRecord);
  const out: Change[] = [];
  for (const k of keys) {
    const record = byKey.get(`${k.entity}:${k.id}`);
    if (record) out.push({ entity: k.entity, record });
  }
  return out;
}

/**
 * One page of the changes the actor may see after `cursor`, in server order (changeSeq) across the
 * synced tables. Each table gives at most `limit + 1` keys, so the first `limit` of the merge are
 * exactly the next `limit` changes overall; `more` says whether there is a next page.
 */
export async function pullChanges(actor: Actor, q: { cursor?: number; limit?: number; deviceId?: string | null }): Promise<PullResponse> {
  authorize(actor, 'sync:pull');
  await db();
  const started = performance.now();
  const cursor = q.cursor ?? 0;
  const limit = Math.min(Math.max(1, q.limit ?? DEFAULT_PULL_LIMIT), MAX_PULL_LIMIT);
  const keys = await nextKeys(actor, cursor, limit + 1);
  const page = keys.slice(0, limit);
  const more = keys.length > limit;
  const changes = await loadChanges(page);
  // The cursor follows the keys, so a row changed again since the key was read cannot stall it.
  const next = page.length ? page[page.length - 1]!.change_seq : cursor;
  // The device id comes from the client as a hint for the ledger; only a device of this user is named.
  let deviceId: string | null = null;
  if (q.deviceId) {
    const d = await Device.findByPk(q.deviceId);
    if (d && d.userId === actor.id) deviceId = d.id;
  }
  await writeTx((t) =>
    appendLedger(t, {
      kind: 'pull', userId: actor.id, deviceId,
      outbreakId: actor.outbreakIds.length === 1 ? actor.outbreakIds[0]! : null,
      counts: { changes: changes.length },
      durationMs: performance.now() - started,
      detail: { from: cursor, to: next, more },
    }),
  );
  return { changes, cursor: next, more };
}
