'use client';
/**
 * Saved scenarios of an outbreak, for the screens. Plain shapes in and out (ScenarioRecord,
 * ScenarioRecordInput), so the source can move to IndexedDB + the outbox without touching a screen.
 *
 *   const { scenarios, loading, error, reload } = useScenarios(outbreakId);
 *   const saved = await saveScenario(outbreakId, { id?, name, input, notes?, official? }, baseVersion?);
 *   await removeScenario(saved);                 // tombstone
 *   await publishScenario(saved.id, true);       // coordinators: the outbreak's official forecast
 *
 * Every change notifies the mounted useScenarios hooks, so lists refresh without a page load.
 */
import { useEffect } from 'react';
import type { ScenarioRecord } from '@/lib/types/records';
import type { ScenarioRecordInput } from '@/lib/validation/scenario-record';
import { apiFetch } from './api';
import { useResource } from './use-resource';

export type ScenarioDraft = Omit<ScenarioRecordInput, 'baseVersion'>;

const listeners = new Set<() => void>();
const changed = () => listeners.forEach((l) => l());

export function useScenarios(outbreakId: string | null) {
  const r = useResource<{ scenarios: ScenarioRecord[] }>(outbreakId ? `/api/outbreaks/${outbreakId}/scenarios` : null);
  const { reload } = r;
  useEffect(() => {
    listeners.add(reload);
    return () => {
      listeners.delete(reload);
    };
  }, [reload]);
  return { ...r, scenarios: r.data?.scenarios ?? [] };
}

/** Creates or updates (by `draft.id`) a scenario of the outbreak. `baseVersion`: the version being edited. */
export async function saveScenario(outbreakId: string, draft: ScenarioDraft, baseVersion?: number): Promise<ScenarioRecord> {
  const { scenario } = await apiFetch<{ scenario: ScenarioRecord }>(`/api/outbreaks/${outbreakId}/scenarios`, {
    method: 'POST',
    json: { ...draft, ...(baseVersion !== undefined ? { baseVersion } : {}) },
  });
  changed();
  return scenario;
}

export async function removeScenario(s: Pick<ScenarioRecord, 'id' | 'version'>): Promise<void> {
  await apiFetch(`/api/scenarios/${s.id}?baseVersion=${s.version}`, { method: 'DELETE' });
  changed();
}

/** Makes the scenario the outbreak's official forecast, or withdraws it (forecast:publish). */
export async function publishScenario(id: string, official: boolean): Promise<ScenarioRecord> {
  const { scenario } = await apiFetch<{ scenario: ScenarioRecord }>(`/api/scenarios/${id}/official`, { method: 'POST', json: { official } });
  changed();
  return scenario;
}
