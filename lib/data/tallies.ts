'use client';
/**
 * Tallies for the screens: hooks and writes. From the API for now; the offline layer will serve the
 * same exports from IndexedDB (so keep shapes plain and this file small).
 */
import { useEffect } from 'react';
import type { ConflictRecord, TallyRecord } from '@/lib/types/records';
import type { EpiCurve } from '@/lib/tallies/curve';
import type { TallyInput } from '@/lib/validation/tally';
import { localToday } from '@/lib/tallies/dates';
import { apiFetch } from './api';
import { useResource } from './use-resource';

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

/** Screens reload their tallies when any write here succeeds. */
const listeners = new Set<() => void>();
const changed = () => listeners.forEach((f) => f());
function useOnChange(reload: () => void) {
  useEffect(() => {
    listeners.add(reload);
    return () => void listeners.delete(reload);
  }, [reload]);
}

const qs = (o: Record<string, string | number | undefined>) => {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(o)) if (v !== undefined && v !== '') p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : '';
};

const filterQuery = (f: TallyFilter) => ({ site: f.siteId, from: f.from, to: f.to, limit: f.limit, offset: f.offset, sort: f.sort });

export function useTallies(outbreakId: string | null, filter: TallyFilter = {}) {
  const url = outbreakId ? `/api/outbreaks/${outbreakId}/tallies${qs(filterQuery(filter))}` : null;
  const r = useResource<{ rows: TallyRecord[]; total: number; people?: Record<string, string> }>(url);
  useOnChange(r.reload);
  return { ...r, rows: r.data?.rows ?? [], total: r.data?.total ?? 0, people: r.data?.people ?? {} };
}

export function useEpiCurve(outbreakId: string | null, siteId?: string | null) {
  const url = outbreakId ? `/api/outbreaks/${outbreakId}/curve${qs({ site: siteId ?? undefined, today: localToday() })}` : null;
  const r = useResource<{ curve: EpiCurve }>(url);
  useOnChange(r.reload);
  return { ...r, curve: r.data?.curve };
}

export interface ReportingGrid {
  from: string;
  to: string;
  sites: { siteId: string; name: string; teamId: string | null; dates: Record<string, number> }[];
}

export function useReportingGrid(outbreakId: string | null, range: { from?: string; to?: string } = {}) {
  const url = outbreakId ? `/api/outbreaks/${outbreakId}/tallies/grid${qs(range)}` : null;
  const r = useResource<ReportingGrid>(url);
  useOnChange(r.reload);
  return { ...r, grid: r.data };
}

/** Records a new tally or, with `id` and `baseVersion`, an edit. A conflict rejects with ApiError 409. */
export async function saveTally(input: TallyInput): Promise<SaveResult> {
  const { id, ...rest } = input;
  const result = id && input.baseVersion
    ? await apiFetch<SaveResult>(`/api/tallies/${id}`, { method: 'PUT', json: rest })
    : await apiFetch<SaveResult>('/api/tallies', { method: 'POST', json: input });
  changed();
  return result;
}

export async function removeTally(id: string, baseVersion: number): Promise<SaveResult> {
  const result = await apiFetch<SaveResult>(`/api/tallies/${id}${qs({ baseVersion })}`, { method: 'DELETE' });
  changed();
  return result;
}

export type { ImportReport } from '@/lib/tallies/csv';
import type { ImportReport } from '@/lib/tallies/csv';

/** Sends a CSV file for the row-by-row report (`commit` false) or to write its valid rows. */
export async function importTalliesFile(outbreakId: string, file: Blob, opts: { commit: boolean; expected?: number }): Promise<ImportReport> {
  const q = qs({ mode: opts.commit ? 'commit' : 'preview', expect: opts.expected, today: localToday() });
  const { report } = await apiFetch<{ report: ImportReport }>(`/api/outbreaks/${outbreakId}/tallies/import${q}`, {
    method: 'POST', body: file, headers: { 'content-type': 'text/csv' },
  });
  if (opts.commit) changed();
  return report;
}

export function exportTalliesUrl(outbreakId: string, filter: Pick<TallyFilter, 'siteId' | 'from' | 'to'> = {}): string {
  return `/api/outbreaks/${outbreakId}/tallies/export${qs({ site: filter.siteId, from: filter.from, to: filter.to })}`;
}
