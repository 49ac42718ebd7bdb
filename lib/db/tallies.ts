import { randomUUID } from 'node:crypto';
import { Op, QueryTypes, type Transaction, type WhereOptions } from 'sequelize';
import { Conflict, Outbreak, Site, Tally } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import { AppError, notFound, validationError } from '@/lib/http/errors';
import type { ConflictRecord, TallyRecord } from '@/lib/types/records';
import { tallyInputSchema, type TallyInput } from '@/lib/validation/tally';
import { decideTallyDelete, decideTallyUpsert, normaliseValues, type CurrentTally, type TallyConflictReason } from '@/lib/sync/tally-rules';
import { addDays, daysBetween, isIsoDay, utcToday } from '@/lib/tallies/dates';
import { CsvTooManyRowsError, parseTallyCsv, serialiseTallyCsv, validateTallyRows, type CsvIssueCode, type ImportReport } from '@/lib/tallies/csv';
import type { TALLY_SORT_KEYS } from '@/lib/tallies/query';
import { db, dialect, writeTx } from './connection';
import { nextChangeSeq, reserveChangeSeqs } from './counters';
import { appendLedger } from './ledger';
import { iso, syncMeta } from './mappers';


export const toTallyRecord = (t: Tally): TallyRecord => ({
  ...syncMeta(t), outbreakId: t.outbreakId, siteId: t.siteId, date: String(t.date), newCases: Number(t.newCases),
  recoveries: t.recoveries ?? null, deaths: t.deaths ?? null, admissions: t.admissions ?? null, note: t.note ?? null,
  recordedBy: t.recordedBy ?? null, recordedAt: iso(t.recordedAt),
});

const parseJson = (s: string | null): Record<string, unknown> | null => (s ? (JSON.parse(s) as Record<string, unknown>) : null);

export const toConflictRecord = (c: Conflict): ConflictRecord => ({
  id: c.id, outbreakId: c.outbreakId, entity: c.entity, entityId: c.entityId, reason: c.reason,
  incoming: parseJson(c.incoming) ?? {}, current: parseJson(c.current), incomingVersion: c.incomingVersion ?? null,
  currentVersion: c.currentVersion ?? null, deviceId: c.deviceId ?? null, userId: c.userId ?? null, recordedAt: iso(c.recordedAt),
  status: c.status, settlement: c.settlement ?? null, settledBy: c.settledBy ?? null, settledAt: iso(c.settledAt),
  settleReason: c.settleReason ?? null, version: Number(c.version), createdAt: iso(c.createdAt)!,
});

export type WriteStatus = 'applied' | 'unchanged' | 'conflict';
export interface TallyWriteResult {
  status: WriteStatus;
  /** The server's record after the call (for a conflict: the value that was kept). */
  tally: TallyRecord;
  conflict?: ConflictRecord;
}

export interface UpsertContext {
  /** The installation that made the change; null on the web form. */
  deviceId: string | null;
  mutationId?: string;
  /** When the change was made on the device (defaults to now). */
  recordedAt?: Date;
  /** When given, the site must belong to this outbreak (routes addressed by outbreak). */
  outbreakId?: string;
}

/** Runs in the caller's transaction (a sync batch, behind the write lock) or opens its own. */
async function inTx<T>(t: Transaction | undefined, fn: (t: Transaction) => Promise<T>): Promise<T> {
  if (t) {
    await db();
    return fn(t);
  }
  return writeTx(fn);
}

const state = (t: Tally): CurrentTally => ({
  version: Number(t.version), deleted: t.deletedAt !== null, deviceId: t.deviceId ?? null, values: normaliseValues(t),
});

/** Latest day a tally may carry: the server's UTC day plus one, the most any time zone is ahead. */
export const latestAcceptedDay = (now = new Date()) => addDays(utcToday(now), 1);

/**
 * The day the client calls today, when it is plausible (within a day of the server's UTC day);
 * else the server's UTC day. Lets a device east or west of UTC import "today" without drift.
 */
export function acceptedToday(clientToday?: string | null, now = new Date()): string {
  const utc = utcToday(now);
  if (clientToday && isIsoDay(clientToday) && Math.abs(daysBetween(utc, clientToday)) <= 1) return clientToday;
  return utc;
}

async function loadSite(siteId: string, t?: Transaction): Promise<Site> {
  const site = await Site.findByPk(siteId, { transaction: t });
  if (!site || site.deletedAt) throw notFound('Site');
  return site;
}

async function storeConflict(
  t: Transaction, actor: Actor, reason: TallyConflictReason, current: Tally,
  incoming: Record<string, unknown>, incomingVersion: number | null, ctx: { deviceId: string | null; mutationId?: string; recordedAt?: Date },
): Promise<ConflictRecord> {
  const now = new Date();
  const c = await Conflict.create({
    id: randomUUID(), outbreakId: current.outbreakId, entity: 'tally', entityId: current.id, reason,
    incoming: JSON.stringify(incoming), current: JSON.stringify(toTallyRecord(current)),
    incomingVersion, currentVersion: Number(current.version), mutationId: ctx.mutationId ?? null,
    deviceId: ctx.deviceId, userId: actor.id, recordedAt: ctx.recordedAt ?? now, status: 'open', version: 1,
    createdAt: now, updatedAt: now,
  }, { transaction: t });
  return toConflictRecord(c);
}

/**
 * Creates or updates the tally of a site and day, under the conflict rules of
 * lib/sync/tally-rules.ts. Field officers may write only their teams' sites (403).
 */
export async function upsertTally(actor: Actor, rawInput: TallyInput, ctx: UpsertContext, t?: Transaction): Promise<TallyWriteResult> {
  const parsed = tallyInputSchema.safeParse(rawInput);
  if (!parsed.success) throw validationError(parsed.error.issues);
  const input = parsed.data;
  return inTx(t, async (tx) => {
    // The site and the tally by id at once (their round trips overlap on the one connection).
    const [site, byId] = await Promise.all([loadSite(input.siteId, tx), input.id ? Tally.findByPk(input.id, { transaction: tx }) : null]);
    if (ctx.outbreakId && site.outbreakId !== ctx.outbreakId) throw notFound('Site');
    authorize(actor, 'tally:write', { outbreakId: site.outbreakId, teamId: site.teamId });
    const outbreak = await Outbreak.findByPk(site.outbreakId, { transaction: tx });
    if (!outbreak || outbreak.deletedAt) throw notFound('Outbreak');
    if (input.date > latestAcceptedDay()) throw new AppError('validation_failed', 'The date is in the future.', { fields: { date: 'The date is in the future.' } });
    if (input.date < String(outbreak.startDate)) {
      throw new AppError('validation_failed', "The date is before the outbreak's day 0.", { fields: { date: `Before the outbreak's day 0 (${outbreak.startDate}).` } });
    }
    const values = normaliseValues(input);
    const baseVersion = input.baseVersion ?? null;
    if (byId && !byId.deletedAt && (byId.siteId !== input.siteId || byId.date !== input.date)) {
      throw new AppError('validation_failed', 'The site and day of a tally cannot change; delete it and record a new one.', { fields: { date: 'Cannot change on an existing tally.' } });
    }
    if (input.id && !byId && baseVersion !== null) throw notFound('Tally');
    const sameDay = byId ? null : await Tally.findOne({ where: { siteId: input.siteId, date: input.date, deletedAt: null }, transaction: tx });
    const decision = decideTallyUpsert({ baseVersion, deviceId: ctx.deviceId, values }, byId ? state(byId) : null, sameDay ? state(sameDay) : null);
    const current = byId ?? sameDay;
    switch (decision.action) {
      case 'unchanged':
        return { status: 'unchanged', tally: toTallyRecord(current!) };
      case 'conflict': {
        const { baseVersion: _b, ...payload } = input;
        const conflict = await storeConflict(tx, actor, decision.reason, current!, { op: 'upsert', ...payload, baseVersion }, baseVersion, ctx);
        return { status: 'conflict', tally: toTallyRecord(current!), conflict };
      }
      case 'update': {
        await byId!.update({ ...values, version: Number(byId!.version) + 1, changeSeq: await nextChangeSeq(tx), updatedBy: actor.id, deviceId: ctx.deviceId }, { transaction: tx });
        return { status: 'applied', tally: toTallyRecord(byId!) };
      }
      default: {
        const created = await Tally.create({
          id: input.id ?? randomUUID(), outbreakId: site.outbreakId, siteId: site.id, date: input.date, ...values,
          version: 1, changeSeq: await nextChangeSeq(tx), updatedBy: actor.id, deviceId: ctx.deviceId,
          recordedBy: actor.id, recordedAt: ctx.recordedAt ?? new Date(),
        }, { transaction: tx });
        return { status: 'applied', tally: toTallyRecord(created) };
      }
    }
  });
}

/** Deletes a tally as a tombstone (nothing synced is physically deleted), under the conflict rules. */
export async function deleteTally(
  actor: Actor, id: string, ctx: { baseVersion: number | null; deviceId: string | null; mutationId?: string; recordedAt?: Date }, t?: Transaction,
): Promise<TallyWriteResult> {
  return inTx(t, async (tx) => {
    const tally = await Tally.findByPk(id, { transaction: tx });
    if (!tally) throw notFound('Tally');
    const site = await Site.findByPk(tally.siteId, { transaction: tx });
    authorize(actor, 'tally:write', { outbreakId: tally.outbreakId, teamId: site?.teamId ?? null });
    const decision = decideTallyDelete({ baseVersion: ctx.baseVersion, deviceId: ctx.deviceId }, state(tally));
    if (decision.action === 'unchanged') return { status: 'unchanged', tally: toTallyRecord(tally) };
    if (decision.action === 'conflict') {
      const conflict = await storeConflict(tx, actor, decision.reason, tally, { op: 'delete', id, baseVersion: ctx.baseVersion }, ctx.baseVersion, ctx);
      return { status: 'conflict', tally: toTallyRecord(tally), conflict };
    }
    await tally.update({ deletedAt: new Date(), version: Number(tally.version) + 1, changeSeq: await nextChangeSeq(tx), updatedBy: actor.id, deviceId: ctx.deviceId }, { transaction: tx });
    return { status: 'applied', tally: toTallyRecord(tally) };
  });
}

/** One tally by id (tombstones included, so a device can see that it was deleted). */
export async function getTallyById(actor: Actor, id: string): Promise<TallyRecord> {
  await db();
  const tally = await Tally.findByPk(id);
  if (!tally) throw notFound('Tally');
  const site = await Site.findByPk(tally.siteId);
  authorize(actor, 'tally:read', { outbreakId: tally.outbreakId, teamId: site?.teamId ?? null });
  return toTallyRecord(tally);
}

export type TallySort = (typeof TALLY_SORT_KEYS)[number];

export interface TallyFilter {
  siteId?: string;
  /** `YYYY-MM-DD`, inclusive. */
  from?: string;
  to?: string;
  /** Rows per page (at most 1,000; default 100). */
  limit?: number;
  offset?: number;
  sort?: TallySort;
}

export const MAX_PAGE = 1000;

/**
 * The sites an actor reads tallies of, as a where-clause on site_id: one site (checked against the
 * actor's team, 403 otherwise), a field officer's teams' sites, or every site of the outbreak.
 */
async function siteScope(actor: Actor, outbreakId: string, siteId?: string): Promise<{ siteIds: string[] | null }> {
  authorize(actor, 'tally:read', { outbreakId });
  await db();
  if (siteId) {
    const site = await Site.findByPk(siteId);
    if (!site || site.deletedAt || site.outbreakId !== outbreakId) throw notFound('Site');
    authorize(actor, 'tally:read', { outbreakId, teamId: site.teamId });
    return { siteIds: [site.id] };
  }
  if (actor.role !== 'field') return { siteIds: null };
  const sites = await Site.findAll({ where: { outbreakId, teamId: { [Op.in]: actor.teamIds } }, attributes: ['id'] });
  return { siteIds: sites.map((s) => s.id) };
}

function tallyWhere(outbreakId: string, siteIds: string[] | null, f: Pick<TallyFilter, 'from' | 'to'>): WhereOptions {
  const where: Record<string | symbol, unknown> = { outbreakId, deletedAt: null };
  if (siteIds) where.siteId = { [Op.in]: siteIds };
  if (f.from || f.to) where.date = { ...(f.from ? { [Op.gte]: f.from } : {}), ...(f.to ? { [Op.lte]: f.to } : {}) };
  return where;
}

/** Names of the people behind the ids, for "recorded by" columns (no other user detail). */
async function namesOf(ids: Iterable<string | null>): Promise<Record<string, string>> {
  const list = [...new Set([...ids].filter((x): x is string => Boolean(x)))];
  if (!list.length) return {};
  const sequelize = await db();
  const users = await sequelize.query<{ id: string; name: string }>('SELECT id, name FROM users WHERE id IN (:list)', { type: QueryTypes.SELECT, replacements: { list } });
  return Object.fromEntries(users.map((u) => [u.id, u.name]));
}

/** Sort keys of the tally list as SQL columns (the query schema allows only these). */
const SORT_COLUMNS: Record<string, string> = {
  date: 't.date', site: 's.name', newCases: 't.new_cases', recordedAt: 't.recorded_at', updatedAt: 't.updated_at',
};

/** A tally row as the database returns it (snake_case; dates as text on SQLite, Date on PostgreSQL). */
interface TallyRow {
  id: string; version: number | string; change_seq: number | string; created_at: Date | string; updated_at: Date | string;
  deleted_at: Date | string | null; updated_by: string | null; device_id: string | null; outbreak_id: string; site_id: string;
  date: string; new_cases: number | string; recoveries: number | null; deaths: number | null; admissions: number | null;
  note: string | null; recorded_by: string | null; recorded_at: Date | string | null;
}

const TALLY_SELECT = `t.id, t.version, t.change_seq, t.created_at, t.updated_at, t.deleted_at, t.updated_by, t.device_id,
  t.outbreak_id, t.site_id, t.date, t.new_cases, t.recoveries, t.deaths, t.admissions, t.note, t.recorded_by, t.recorded_at`;

const tallyRowToRecord = (r: TallyRow): TallyRecord => ({
  id: r.id, version: Number(r.version), changeSeq: Number(r.change_seq), createdAt: iso(r.created_at)!, updatedAt: iso(r.updated_at)!,
  deletedAt: iso(r.deleted_at), updatedBy: r.updated_by ?? null, deviceId: r.device_id ?? null,
  outbreakId: r.outbreak_id, siteId: r.site_id, date: String(r.date), newCases: Number(r.new_cases),
  recoveries: r.recoveries ?? null, deaths: r.deaths ?? null, admissions: r.admissions ?? null, note: r.note ?? null,
  recordedBy: r.recorded_by ?? null, recordedAt: iso(r.recorded_at),
});

/**
 * Live tallies of an outbreak, filtered, sorted and paged; `people` names the recorders.
 * The busiest read of the desk and the tablets, so it is three plain queries (page, count, names)
 * rather than model instances: the scope (one site, or a field officer's teams' sites) is part of
 * the same WHERE clause.
 */
export async function listTalliesByOutbreak(
  actor: Actor, outbreakId: string, filter: TallyFilter = {},
): Promise<{ rows: TallyRecord[]; total: number; people: Record<string, string> }> {
  authorize(actor, 'tally:read', { outbreakId });
  const sequelize = await db();
  const replacements: Record<string, unknown> = { outbreakId };
  const where = ['t.outbreak_id = :outbreakId', 't.deleted_at IS NULL'];
  if (filter.siteId) {
    const [site] = await sequelize.query<{ outbreak_id: string; team_id: string | null; deleted_at: unknown }>(
      'SELECT outbreak_id, team_id, deleted_at FROM sites WHERE id = :id', { type: QueryTypes.SELECT, replacements: { id: filter.siteId } });
    if (!site || site.deleted_at || site.outbreak_id !== outbreakId) throw notFound('Site');
    authorize(actor, 'tally:read', { outbreakId, teamId: site.team_id });
    where.push('t.site_id = :siteId');
    replacements.siteId = filter.siteId;
  } else if (actor.role === 'field') {
    where.push(actor.teamIds.length ? 's.team_id IN (:teamIds)' : '1 = 0');
    replacements.teamIds = actor.teamIds;
  }
  if (filter.from) (where.push('t.date >= :from'), (replacements.from = filter.from));
  if (filter.to) (where.push('t.date <= :to'), (replacements.to = filter.to));
  const sort = filter.sort ?? '-date';
  const dir = sort.startsWith('-') ? 'DESC' : 'ASC';
  const field = sort.replace(/^-/, '');
  const column = SORT_COLUMNS[field];
  if (!column) throw validationError([{ path: ['sort'], message: 'Not a sort key of the tally list.' }]);
  const order = field === 'site' ? `s.name ${dir}, t.date DESC` : `${column} ${dir}, s.name ASC, t.date DESC`;
  replacements.limit = Math.min(Math.max(filter.limit ?? 100, 1), MAX_PAGE);
  replacements.offset = Math.max(filter.offset ?? 0, 0);
  const from = `FROM tallies t JOIN sites s ON s.id = t.site_id WHERE ${where.join(' AND ')}`;
  const [rows, [count]] = await Promise.all([
    sequelize.query<TallyRow>(`SELECT ${TALLY_SELECT} ${from} ORDER BY ${order}, t.id LIMIT :limit OFFSET :offset`, { type: QueryTypes.SELECT, replacements }),
    sequelize.query<{ n: number | string }>(`SELECT COUNT(*) AS n ${from}`, { type: QueryTypes.SELECT, replacements }),
  ]);
  const records = rows.map(tallyRowToRecord);
  return { rows: records, total: Number(count?.n ?? 0), people: await namesOf(records.flatMap((r) => [r.recordedBy, r.updatedBy])) };
}

/**
 * Which sites reported on which days, for the completeness grid: one SELECT of (site, day) pairs
 * over a window (default: the 21 days up to `to`, never before day 0), never the tallies themselves.
 */
export async function getReportingGrid(
  actor: Actor, outbreakId: string, opts: { from?: string; to?: string } = {},
): Promise<{ from: string; to: string; sites: { siteId: string; name: string; teamId: string | null; dates: Record<string, number> }[] }> {
  const { siteIds } = await siteScope(actor, outbreakId);
  const outbreak = await Outbreak.findByPk(outbreakId, { attributes: ['startDate'] });
  if (!outbreak) throw notFound('Outbreak');
  const to = opts.to ?? utcToday();
  let from = opts.from ?? addDays(to, -20);
  // Days before day 0 have nothing to report; showing them as gaps would read as missing reports.
  if (from < String(outbreak.startDate)) from = String(outbreak.startDate);
  if (from > to) from = to;
  if (daysBetween(from, to) > 366) from = addDays(to, -366);
  const sites = await Site.findAll({ where: { outbreakId, deletedAt: null, ...(siteIds ? { id: { [Op.in]: siteIds } } : {}) }, order: [['name', 'ASC']] });
  const rows = await Tally.findAll({ where: tallyWhere(outbreakId, siteIds, { from, to }), attributes: ['siteId', 'date', 'newCases'], raw: true });
  const bySite = new Map<string, Record<string, number>>();
  for (const r of rows as unknown as { siteId: string; date: string; newCases: number }[]) {
    const m = bySite.get(r.siteId) ?? {};
    m[r.date] = Number(r.newCases);
    bySite.set(r.siteId, m);
  }
  return { from, to, sites: sites.map((s) => ({ siteId: s.id, name: s.name, teamId: s.teamId, dates: bySite.get(s.id) ?? {} })) };
}

/** The filtered tallies as CSV in the import format (every matching row, not one page). */
export async function exportTalliesCsv(actor: Actor, outbreakId: string, filter: Pick<TallyFilter, 'siteId' | 'from' | 'to'> = {}): Promise<string> {
  const { siteIds } = await siteScope(actor, outbreakId, filter.siteId);
  const rows = await Tally.findAll({
    where: tallyWhere(outbreakId, siteIds, filter), include: [{ model: Site, attributes: ['name'] }],
    order: [['date', 'ASC'], [Site, 'name', 'ASC']],
  });
  return serialiseTallyCsv(rows.map((r) => ({
    siteName: (r as unknown as { Site?: { name: string } }).Site?.name ?? '', date: r.date, newCases: Number(r.newCases),
    recoveries: r.recoveries ?? null, deaths: r.deaths ?? null, admissions: r.admissions ?? null, note: r.note ?? null,
  })));
}

// ---------------------------------------------------------------------------------------------
// CSV import

/** Issues sent back in one answer; the counts per kind cover them all. */
export const MAX_REPORTED_ISSUES = 2000;


const IMPORT_COLUMNS = ['id', 'version', 'change_seq', 'created_at', 'updated_at', 'deleted_at', 'updated_by', 'device_id', 'outbreak_id', 'site_id',
  'date', 'new_cases', 'recoveries', 'deaths', 'admissions', 'note', 'recorded_by', 'recorded_at'] as const;

/**
 * Writes imported tallies with multi-row INSERTs, 500 rows a statement, values escaped by the
 * dialect's own `escape` (as Sequelize's bulkCreate does). Measured on 10,000 rows into a
 * 180,000-row table: model instances (bulkCreate) and bound parameters ($n) were each several
 * times slower than this (bench/tallies.bench.ts). Each row gets its own change counter value,
 * in file order, from the block reserved for it.
 */
async function insertImported(t: Transaction, actor: Actor, outbreakId: string, rows: TallyInput[], firstSeq: number): Promise<void> {
  const sequelize = await db();
  const e = (v: string | number | null) => (v === null ? 'NULL' : typeof v === 'number' ? String(Math.trunc(v)) : sequelize.escape(v));
  // Sequelize's own text form of a DATE on SQLite, so the models read these rows like their own.
  const now = e(dialect() === 'postgres' ? new Date().toISOString() : new Date().toISOString().replace('T', ' ').replace('Z', ' +00:00'));
  const who = e(actor.id);
  const ob = e(outbreakId);
  // A bigger page cache for the writer connection: thousands of inserts land all over six indexes,
  // and SQLite's default 2 MB cache re-reads the same pages (10,000 rows: 4.4 s → 2.7 s, loaded
  // machine). The writer is kept open (connection.ts), so later writes keep the cache; it fills only
  // with pages actually used.
  if (dialect() === 'sqlite') await sequelize.query('PRAGMA cache_size = -65536', { transaction: t });
  const CHUNK = 500;
  for (let i = 0; i < rows.length; i += CHUNK) {
    const tuples = rows.slice(i, i + CHUNK).map((r, j) => {
      const v = normaliseValues(r);
      return `(${e(randomUUID())},1,${firstSeq + i + j},${now},${now},NULL,${who},NULL,${ob},${e(r.siteId)},${e(r.date)},${e(v.newCases)},${e(v.recoveries)},${e(v.deaths)},${e(v.admissions)},${e(v.note)},${who},${now})`;
    });
    await sequelize.query(`INSERT INTO tallies (${IMPORT_COLUMNS.join(',')}) VALUES ${tuples.join(',')}`, { transaction: t, type: QueryTypes.INSERT });
  }
}

async function importContext(outbreakId: string, dates: string[], t?: Transaction) {
  const outbreak = await Outbreak.findByPk(outbreakId, { transaction: t });
  if (!outbreak || outbreak.deletedAt) throw notFound('Outbreak');
  const sites = await Site.findAll({ where: { outbreakId, deletedAt: null }, attributes: ['id', 'name'], transaction: t });
  const valid = dates.filter(isIsoDay).sort();
  const existing = new Map<string, { version: number; newCases: number; recoveries: number | null; deaths: number | null; admissions: number | null; note: string | null }>();
  if (valid.length) {
    const sequelize = await db();
    const rows = await sequelize.query<{ site_id: string; date: string; version: number; new_cases: number; recoveries: number | null; deaths: number | null; admissions: number | null; note: string | null }>(
      `SELECT site_id, date, version, new_cases, recoveries, deaths, admissions, note FROM tallies
       WHERE outbreak_id = :outbreakId AND deleted_at IS NULL AND date BETWEEN :from AND :to`,
      { type: QueryTypes.SELECT, replacements: { outbreakId, from: valid[0], to: valid[valid.length - 1] }, transaction: t },
    );
    for (const r of rows) {
      existing.set(`${r.site_id}|${r.date}`, { version: Number(r.version), newCases: Number(r.new_cases), recoveries: r.recoveries, deaths: r.deaths, admissions: r.admissions, note: r.note });
    }
  }
  return {
    startDate: String(outbreak.startDate),
    sites: sites.map((s) => ({ id: s.id, name: s.name })),
    existing: (siteId: string, date: string) => existing.get(`${siteId}|${date}`),
  };
}

/**
 * Checks a CSV file against the outbreak and, with `commit`, writes every valid row in ONE
 * transaction (all of them or none). Without `commit` nothing is written: the answer is the
 * preview. `expected` (the preview's valid count) guards against the data changing in between:
 * if the file would now write a different number of rows, nothing is written (409).
 */
export async function importTalliesCsv(
  actor: Actor, outbreakId: string, text: string, opts: { commit: boolean; expected?: number; today?: string | null },
): Promise<ImportReport> {
  authorize(actor, 'tally:import', { outbreakId });
  await db();
  let parsed;
  try {
    parsed = parseTallyCsv(text);
  } catch (err) {
    if (err instanceof CsvTooManyRowsError) throw new AppError('unprocessable', err.message, { detail: { limit: 'rows' } });
    throw err;
  }
  const today = acceptedToday(opts.today);
  const dates = parsed.rows.map((r) => r.cells.date ?? '');
  const check = async (t?: Transaction) => validateTallyRows(parsed, { ...(await importContext(outbreakId, dates, t)), today });
  const summarise = (report: ReturnType<typeof validateTallyRows>, imported?: number): ImportReport => {
    const kinds: Partial<Record<CsvIssueCode, number>> = {};
    for (const i of report.issues) kinds[i.code] = (kinds[i.code] ?? 0) + 1;
    return {
      rows: report.rows, validCount: report.valid.length, unchangedCount: report.unchanged.length,
      issues: report.issues.slice(0, MAX_REPORTED_ISSUES), issuesTotal: report.issues.length, kinds,
      badLines: new Set(report.issues.filter((i) => i.line > 1).map((i) => i.line)).size,
      preview: report.valid.slice(0, 20).map((v) => ({ line: v.line, site: v.siteName, date: v.input.date, newCases: v.input.newCases,
        recoveries: v.input.recoveries ?? null, deaths: v.input.deaths ?? null, admissions: v.input.admissions ?? null, note: v.input.note ?? null })),
      fatal: report.fatal, ...(imported !== undefined ? { imported } : {}),
    };
  };
  if (!opts.commit) return summarise(await check());

  return writeTx(async (t) => {
    const started = Date.now();
    // Checked again inside the transaction: the preview may be minutes old.
    const report = await check(t);
    if (report.fatal) throw new AppError('unprocessable', 'The file cannot be read as tallies; see the report.', { detail: { report: summarise(report) } });
    if (opts.expected !== undefined && opts.expected !== report.valid.length) {
      throw new AppError('conflict', `The data changed since the preview: ${report.valid.length} rows would now be written instead of ${opts.expected}. Nothing was written; check the file again.`, { detail: { report: summarise(report) } });
    }
    const n = report.valid.length;
    if (n > 0) {
      const firstSeq = await reserveChangeSeqs(t, n);
      await insertImported(t, actor, outbreakId, report.valid.map((v) => v.input), firstSeq);
    }
    await appendLedger(t, {
      kind: 'tally_import', userId: actor.id, outbreakId,
      counts: { rows: report.rows, imported: n, unchanged: report.unchanged.length, refused: report.issues.length },
      durationMs: Date.now() - started,
    });
    return summarise(report, n);
  });
}
