'use client';
/**
 * The one data-hook layer of the field screens. Screens call these and never fetch themselves.
 * Outbreaks, sites and teams come from this device's database, filled by sync (pull); on a first
 * load before any pull has finished, the API answers instead and its records are kept locally.
 */
import { useEffect } from 'react';
import type { OutbreakRecord, SiteRecord, TeamRecord } from '@/lib/types/records';
import type { LocalRecord } from '@/lib/sync/engine';
import { loadSync } from '@/lib/offline/lazy';
import { useLive } from '@/lib/offline/use-live';
import { usePulled } from '@/lib/offline/use-pulled';
import { useResource, type Resource } from './use-resource';

const live = (r: LocalRecord) => !r.deletedAt;


/**
 * Local rows, or the API while the device has never pulled: `url` is asked only then, and what it
 * answers is cached so the next screen opens from the database.
 */
function useLocalFirst<T, R extends { id: string }>(
  local: R[] | undefined,
  url: string | null,
  pick: (d: T) => R[],
  entity: 'outbreak' | 'site' | 'team',
): Resource<T> & { rows: R[] } {
  const pulled = usePulled();
  const fallback = pulled === false && (!local || local.length === 0) ? url : null;
  const api = useResource<T>(fallback);
  useEffect(() => {
    if (api.data) void loadSync().then((m) => m.cacheServerRecords(entity, pick(api.data!) as unknown as LocalRecord[])).catch(() => undefined);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [api.data]);
  const rows = local && local.length ? local : api.data ? pick(api.data) : (local ?? []);
  return {
    data: api.data,
    error: local && local.length ? null : api.error,
    loading: local === undefined || (Boolean(fallback) && api.loading && !rows.length),
    reload: () => {
      api.reload();
      void loadSync().then((m) => m.requestSync());
    },
    rows,
  };
}

const byName = (a: { name: string }, b: { name: string }) => a.name.localeCompare(b.name);

export function useOutbreaks() {
  const local = useLive(async (db) => ((await db.outbreaks.toArray()).filter(live) as unknown as OutbreakRecord[]).sort((a, b) => b.startDate.localeCompare(a.startDate)), []);
  const r = useLocalFirst<{ outbreaks: OutbreakRecord[] }, OutbreakRecord>(local, '/api/outbreaks', (d) => d.outbreaks, 'outbreak');
  return { ...r, outbreaks: r.rows };
}

export function useOutbreak(id: string | null) {
  const local = useLive(async (db) => {
    if (!id) return [];
    const o = await db.outbreaks.get(id);
    return o && live(o) ? [o as unknown as OutbreakRecord] : [];
  }, [id]);
  const r = useLocalFirst<{ outbreak: OutbreakRecord }, OutbreakRecord>(local, id ? `/api/outbreaks/${id}` : null, (d) => [d.outbreak], 'outbreak');
  return { ...r, outbreak: r.rows[0] };
}

export function useSites(outbreakId: string | null) {
  const local = useLive(async (db) => {
    if (!outbreakId) return [];
    return ((await db.sites.where('outbreakId').equals(outbreakId).toArray()).filter(live) as unknown as SiteRecord[]).sort(byName);
  }, [outbreakId]);
  const r = useLocalFirst<{ sites: SiteRecord[] }, SiteRecord>(local, outbreakId ? `/api/outbreaks/${outbreakId}/sites` : null, (d) => d.sites, 'site');
  return { ...r, sites: r.rows };
}

export function useTeams(outbreakId: string | null) {
  const local = useLive(async (db) => {
    if (!outbreakId) return [];
    return ((await db.teams.where('outbreakId').equals(outbreakId).toArray()).filter(live) as unknown as TeamRecord[]).sort(byName);
  }, [outbreakId]);
  const r = useLocalFirst<{ teams: TeamRecord[] }, TeamRecord>(local, outbreakId ? `/api/outbreaks/${outbreakId}/teams` : null, (d) => d.teams, 'team');
  return { ...r, teams: r.rows };
}
