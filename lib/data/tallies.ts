'use client';
/**
 * Tallies for the screens: hooks and writes, served from this device's database (lib/offline) so
 * that the screens work the same online and offline. A write goes into IndexedDB and the outbox
 * in one transaction and reaches the server with the next sync (SYNC.md); what other devices
 * recorded arrives by pull. CSV import and export stay online calls (files go to the server).
 */
import { useEffect, useMemo } from 'react';
import type { ConflictRecord, SiteRecord, TallyRecord } from '@/lib/types/records';
import { useConnectivity } from '@/lib/stores/connectivity';
import { useResource } from './use-resource';
import { computeEpiCurve, type EpiCurve } from '@/lib/tallies/curve';
import { addDays, dayRange, localToday } from '@/lib/tallies/dates';
import { tallyInputSchema, type TallyInput } from '@/lib/validation/tally';
import { normaliseValues, sameValues } from '@/lib/sync/tally-rules';
import type { LocalRecord } from '@/lib/sync/engine';
import { loadDb, loadSync } from '@/lib/offline/lazy';
import type { EbbcastDb } from '@/lib/offline/db';
import { useLive } from '@/lib/offline/use-live';
import { usePulled } from '@/lib/offline/use-pulled';
import { apiFetch, ApiError } from './api';
import { fieldsFromIssues } from '@/lib/http/errors';

export interface TallyFilter {
  siteId?: string;
  /** `YYYY-MM-DD`, inclusive. */
  from?: string;
  to?: string;
  limit?: number;
  offset?: number;
  /** date, -date, site, -site, newCases, -newCases, recordedAt, -recordedAt, updatedAt, -updatedAt. */
  sort?: string;
}

export interface SaveResult {
  status: 'applied' | 'unchanged' | 'conflict';
  tally: TallyRecord;
  conflict?: ConflictRecord;
}

const qs = (o: Record<string, string | number | undefined>) => {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(o)) if (v !== undefined && v !== '') p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : '';
};

/**
 * A stored row as the screens see it. A tally not yet on the server is stored with version 0; it
 * is shown as version 1 (the version it will become), so forms that send `baseVersion` stay valid.
 * The outbox takes the base version from the stored row, never from the form.
 */
const asRecord = (r: LocalRecord): TallyRecord => ({ ...(r as unknown as TallyRecord), version: Math.max(1, Number(r.version)) });

const live = (r: LocalRecord) => !r.deletedAt;

interface LocalState<T> {
  data: T | undefined;
  error: Error | null;
  loading: boolean;
  reload: () => void;
}

function state<T>(data: T | undefined): LocalState<T> {
  return { data, error: null, loading: data === undefined, reload: () => void loadSync().then((m) => m.requestSync()) };
}

async function outbreakTallies(db: EbbcastDb, outbreakId: string, siteId?: string | null): Promise<LocalRecord[]> {
  const rows = siteId ? await db.tallies.where('siteId').equals(siteId).toArray() : await db.tallies.where('outbreakId').equals(outbreakId).toArray();
  return rows.filter((r) => live(r) && r.outbreakId === outbreakId);
}

function compare(sort: string, siteName: (id: string) => string) {
  const desc = sort.startsWith('-');
  const key = sort.replace(/^-/, '');
  const val = (r: TallyRecord): string | number => {
    if (key === 'site') return siteName(r.siteId);
    if (key === 'newCases') return r.newCases;
    if (key === 'recordedAt') return r.recordedAt ?? '';
    if (key === 'updatedAt') return r.updatedAt ?? '';
    return r.date;
  };
  return (a: TallyRecord, b: TallyRecord) => {
    const x = val(a), y = val(b);
    const c = x < y ? -1 : x > y ? 1 : 0;
    if (c !== 0) return desc ? -c : c;
    const s = siteName(a.siteId).localeCompare(siteName(b.siteId));
    return s !== 0 ? s : b.date.localeCompare(a.date);
  };
}

const ME_KEY = 'ebbcast.me';
const PEOPLE_KEY = 'ebbcast.people';
/** Names of the people behind recordedBy/updatedBy: the signed-in user, plus names the server sent before (kept for offline). */
function localPeople(): Record<string, string> {
  try {
    const me = JSON.parse(localStorage.getItem(ME_KEY) ?? 'null') as { id: string; name: string } | null;
    const known = JSON.parse(localStorage.getItem(PEOPLE_KEY) ?? '{}') as Record<string, string>;
    return { ...known, ...(me ? { [me.id]: me.name } : {}) };
  } catch {
    return {};
  }
}
function rememberPeople(p: Record<string, string> | undefined) {
  if (!p || !Object.keys(p).length) return;
  try {
    localStorage.setItem(PEOPLE_KEY, JSON.stringify({ ...JSON.parse(localStorage.getItem(PEOPLE_KEY) ?? '{}'), ...p }));
  } catch {
    /* storage full: names are a convenience */
  }
}
const myId = (): string | null => {
  try {
    return (JSON.parse(localStorage.getItem(ME_KEY) ?? 'null') as { id: string } | null)?.id ?? null;
  } catch {
    return null;
  }
};

export function useTallies(outbreakId: string | null, filter: TallyFilter = {}) {
  const { siteId, from, to, limit = 100, offset = 0, sort = '-date' } = filter;
  const data = useLive(async (db) => {
    if (!outbreakId) return { rows: [] as TallyRecord[], total: 0, people: {} as Record<string, string> };
    const sites = new Map((await db.sites.where('outbreakId').equals(outbreakId).toArray()).map((s) => [s.id, String(s.name)]));
    const rows = (await outbreakTallies(db, outbreakId, siteId))
      .filter((r) => (!from || String(r.date) >= from) && (!to || String(r.date) <= to))
      .map(asRecord)
      .sort(compare(sort, (id) => sites.get(id) ?? ''));
    const page = rows.slice(Math.max(0, offset), Math.max(0, offset) + Math.min(Math.max(limit, 1), 1000));
    return { rows: page, total: rows.length, people: localPeople() };
  }, [outbreakId, siteId, from, to, limit, offset, sort]);
  // Online, the server's page names the recorders (other people's names are not on the device);
  // before the first pull it is also the answer itself.
  const online = useConnectivity((c) => c.online);
  const pulled = usePulled();
  const api = useResource<{ rows: TallyRecord[]; total: number; people?: Record<string, string> }>(
    online && outbreakId ? `/api/outbreaks/${outbreakId}/tallies${qs({ site: siteId, from, to, limit, offset, sort })}` : null,
  );
  useEffect(() => rememberPeople(api.data?.people), [api.data]);
  const people = useMemo(() => ({ ...(data?.people ?? {}), ...(api.data?.people ?? {}) }), [data, api.data]);
  if (pulled === false && online && outbreakId) {
    return { ...api, rows: api.data?.rows ?? [], total: api.data?.total ?? 0, people };
  }
  const s = state(outbreakId ? (pulled === undefined ? undefined : data) : { rows: [], total: 0, people: {} });
  return { ...s, rows: data?.rows ?? [], total: data?.total ?? 0, people };
}

export function useEpiCurve(outbreakId: string | null, siteId?: string | null) {
  const today = localToday();
  const data = useLive(async (db) => {
    if (!outbreakId) return null;
    const outbreak = await db.outbreaks.get(outbreakId);
    if (!outbreak || outbreak.deletedAt) return null;
    const sites = (await db.sites.where('outbreakId').equals(outbreakId).toArray()).filter(live);
    const tallies = await outbreakTallies(db, outbreakId, siteId);
    const inView = siteId ? 1 : sites.length;
    return computeEpiCurve(tallies.map((t) => ({ date: String(t.date), newCases: Number(t.newCases) })), {
      startDate: String(outbreak.startDate), today, sitesInView: inView, siteId: siteId ?? null,
    });
  }, [outbreakId, siteId, today]);
  const online = useConnectivity((c) => c.online);
  const pulled = usePulled();
  const api = useResource<{ curve: EpiCurve }>(
    pulled === false && online && outbreakId ? `/api/outbreaks/${outbreakId}/curve${qs({ site: siteId ?? undefined, today })}` : null,
  );
  if (pulled === false && online && outbreakId) return { ...api, curve: api.data?.curve };
  const s = state<{ curve: EpiCurve } | undefined>(data === undefined || pulled === undefined ? undefined : data ? { curve: data } : undefined);
  return { ...s, loading: data === undefined || pulled === undefined, curve: pulled === undefined ? undefined : (data ?? undefined) };
}

export interface ReportingGrid {
  from: string;
  to: string;
  sites: { siteId: string; name: string; teamId: string | null; dates: Record<string, number> }[];
}

export function useReportingGrid(outbreakId: string | null, range: { from?: string; to?: string } = {}) {
  const to = range.to ?? localToday();
  const from = range.from ?? addDays(to, -27);
  const data = useLive(async (db): Promise<ReportingGrid | null> => {
    if (!outbreakId) return null;
    const sites = (await db.sites.where('outbreakId').equals(outbreakId).toArray()).filter(live) as unknown as SiteRecord[];
    sites.sort((a, b) => a.name.localeCompare(b.name));
    const days = new Set(dayRange(from <= to ? from : to, to));
    const bySite = new Map<string, Record<string, number>>();
    for (const t of await outbreakTallies(db, outbreakId)) {
      const d = String(t.date);
      if (!days.has(d)) continue;
      const m = bySite.get(String(t.siteId)) ?? {};
      m[d] = Number(t.newCases);
      bySite.set(String(t.siteId), m);
    }
    return { from, to, sites: sites.map((s) => ({ siteId: s.id, name: s.name, teamId: s.teamId, dates: bySite.get(s.id) ?? {} })) };
  }, [outbreakId, from, to]);
  const online = useConnectivity((c) => c.online);
  const pulled = usePulled();
  const api = useResource<ReportingGrid>(pulled === false && online && outbreakId ? `/api/outbreaks/${outbreakId}/tallies/grid${qs({ from: range.from, to: range.to })}` : null);
  if (pulled === false && online && outbreakId) return { ...api, grid: api.data };
  const s = state(data === null ? undefined : data);
  return { ...s, loading: data === undefined || pulled === undefined, grid: pulled === undefined ? undefined : (data ?? undefined) };
}

function invalid(fields: Record<string, string>, message = 'Some fields are not valid.'): ApiError {
  return new ApiError(400, 'validation_failed', message, fields);
}

/**
 * Records a new tally or an edit, on this device (and in the outbox). The same site and day can
 * hold one live tally: a second one for a day already recorded here becomes an edit of that one,
 * or "unchanged" when the counts are the same. Disagreements with other devices are found by the
 * server at sync and go to the merge desk.
 */
export async function saveTally(input: TallyInput): Promise<SaveResult> {
  const { baseVersion: _ignored, ...rest } = input;
  const parsed = tallyInputSchema.safeParse(rest);
  if (!parsed.success) throw invalid(fieldsFromIssues(parsed.error.issues));
  const v = parsed.data;
  const db = await loadDb();
  let site = await db.sites.get(v.siteId);
  // Right after the first sign-in the screen may show the API's sites before the first pull has
  // stored them: let that sync finish once, then look again.
  if (!site && navigator.onLine) {
    await (await loadSync()).requestSync();
    site = await db.sites.get(v.siteId);
  }
  if (!site || site.deletedAt) throw new ApiError(404, 'not_found', 'Site was not found on this device.');
  const outbreak = await db.outbreaks.get(String(site.outbreakId));
  if (outbreak && v.date < String(outbreak.startDate)) throw invalid({ date: `Before the outbreak's day 0 (${String(outbreak.startDate)}).` }, "The date is before the outbreak's day 0.");
  if (v.date > addDays(localToday(), 1)) throw invalid({ date: 'The date is in the future.' }, 'The date is in the future.');
  let existing = v.id ? await db.tallies.get(v.id) : undefined;
  if (!existing || existing.deletedAt) {
    const sameDay = (await db.tallies.where('[siteId+date]').equals([v.siteId, v.date]).toArray()).find(live);
    if (sameDay && sameDay.id !== v.id) existing = sameDay;
  }
  if (existing && existing.deletedAt) existing = undefined;
  const values = normaliseValues(v);
  if (existing && sameValues(normaliseValues(existing as unknown as TallyRecord), values)) return { status: 'unchanged', tally: asRecord(existing) };
  const now = new Date().toISOString();
  const me = myId();
  const record: LocalRecord = {
    ...(existing ?? {}),
    id: existing?.id ?? v.id ?? crypto.randomUUID(),
    version: Number(existing?.version ?? 0),
    changeSeq: Number(existing?.changeSeq ?? 0),
    deletedAt: null,
    outbreakId: String(site.outbreakId),
    siteId: v.siteId,
    date: v.date,
    ...values,
    createdAt: (existing?.createdAt as string | undefined) ?? now,
    updatedAt: now,
    updatedBy: me,
    deviceId: null,
    recordedBy: (existing?.recordedBy as string | null | undefined) ?? me,
    recordedAt: (existing?.recordedAt as string | null | undefined) ?? now,
  };
  await (await loadSync()).saveLocal('tally', record, { siteId: v.siteId, date: v.date, ...values });
  return { status: 'applied', tally: asRecord((await db.tallies.get(record.id)) ?? record) };
}

/** Deletes a tally on this device (a tombstone until the server answers) and queues the delete. */
export async function removeTally(id: string, _baseVersion: number): Promise<SaveResult> {
  const db = await loadDb();
  const existing = await db.tallies.get(id);
  if (!existing) throw new ApiError(404, 'not_found', 'Tally was not found on this device.');
  if (existing.deletedAt) return { status: 'unchanged', tally: asRecord(existing) };
  await (await loadSync()).deleteLocal('tally', existing);
  return { status: 'applied', tally: asRecord((await db.tallies.get(id)) ?? existing) };
}

export type { ImportReport } from '@/lib/tallies/csv';
import type { ImportReport } from '@/lib/tallies/csv';

/**
 * Sends a CSV file for the row-by-row report (`commit` false) or to write its valid rows (online:
 * the file goes to the server). After a commit the device syncs, so the new rows arrive by pull.
 */
export async function importTalliesFile(outbreakId: string, file: Blob, opts: { commit: boolean; expected?: number }): Promise<ImportReport> {
  const q = qs({ mode: opts.commit ? 'commit' : 'preview', expect: opts.expected, today: localToday() });
  const { report } = await apiFetch<{ report: ImportReport }>(`/api/outbreaks/${outbreakId}/tallies/import${q}`, {
    method: 'POST', body: file, headers: { 'content-type': 'text/csv' },
  });
  if (opts.commit) void loadSync().then((m) => m.requestSync());
  return report;
}

export function exportTalliesUrl(outbreakId: string, filter: Pick<TallyFilter, 'siteId' | 'from' | 'to'> = {}): string {
  return `/api/outbreaks/${outbreakId}/tallies/export${qs({ site: filter.siteId, from: filter.from, to: filter.to })}`;
}

