'use client';
/**
 * The one data-hook layer of the field screens. Screens call these and never fetch themselves,
 * so the source can change (API now, IndexedDB with the offline layer) without touching a screen.
 */
import type { OutbreakRecord, SiteRecord, TeamRecord } from '@/lib/types/records';
import { useResource } from './use-resource';

export function useOutbreaks() {
  const r = useResource<{ outbreaks: OutbreakRecord[] }>('/api/outbreaks');
  return { ...r, outbreaks: r.data?.outbreaks ?? [] };
}

export function useOutbreak(id: string | null) {
  const r = useResource<{ outbreak: OutbreakRecord }>(id ? `/api/outbreaks/${id}` : null);
  return { ...r, outbreak: r.data?.outbreak };
}

export function useSites(outbreakId: string | null) {
  const r = useResource<{ sites: SiteRecord[] }>(outbreakId ? `/api/outbreaks/${outbreakId}/sites` : null);
  return { ...r, sites: r.data?.sites ?? [] };
}

export function useTeams(outbreakId: string | null) {
  const r = useResource<{ teams: TeamRecord[] }>(outbreakId ? `/api/outbreaks/${outbreakId}/teams` : null);
  return { ...r, teams: r.data?.teams ?? [] };
}
