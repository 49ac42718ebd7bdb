'use client';
/**
 * Saved scenarios of an outbreak, for the screens, served from this device's database so that the
 * scenario and forecast screens work offline. Plain shapes in and out (ScenarioRecord,
 * ScenarioRecordInput).
 *
 *   const { scenarios, loading, error, reload } = useScenarios(outbreakId);
 *   const saved = await saveScenario(outbreakId, { id?, name, input, notes?, official? }, baseVersion?);
 *   await removeScenario(saved);                 // tombstone
 *   await publishScenario(saved.id, true);       // coordinators, online: the outbreak's official forecast
 *
 * A save or delete goes into IndexedDB and the outbox in one transaction and reaches the server at
 * the next sync; every mounted useScenarios follows the database, so lists refresh by themselves.
 */
import type { ScenarioRecord } from '@/lib/types/records';
import { scenarioRecordInputSchema, type ScenarioRecordInput } from '@/lib/validation/scenario-record';
import { fieldsFromIssues } from '@/lib/http/errors';
import type { LocalRecord } from '@/lib/sync/engine';
import { loadDb, loadSync } from '@/lib/offline/lazy';
import { useLive } from '@/lib/offline/use-live';
import { apiFetch, ApiError } from './api';

export type ScenarioDraft = Omit<ScenarioRecordInput, 'baseVersion'>;

/** A scenario not yet on the server is stored with version 0 and shown as version 1 (see lib/data/tallies). */
const asRecord = (r: LocalRecord): ScenarioRecord => ({ ...(r as unknown as ScenarioRecord), version: Math.max(1, Number(r.version)) });

export function useScenarios(outbreakId: string | null) {
  const data = useLive(async (db) => {
    if (!outbreakId) return [] as ScenarioRecord[];
    const rows = (await db.scenarios.where('outbreakId').equals(outbreakId).toArray()).filter((r) => !r.deletedAt).map(asRecord);
    // The official forecast first, then the newest.
    return rows.sort((a, b) => Number(b.official) - Number(a.official) || String(b.updatedAt).localeCompare(String(a.updatedAt)));
  }, [outbreakId]);
  return {
    data: data === undefined ? undefined : { scenarios: data },
    error: null as Error | null,
    loading: data === undefined,
    reload: () => void loadSync().then((m) => m.requestSync()),
    scenarios: data ?? [],
  };
}

const ME_KEY = 'ebbcast.me';
const myId = (): string | null => {
  try {
    return (JSON.parse(localStorage.getItem(ME_KEY) ?? 'null') as { id: string } | null)?.id ?? null;
  } catch {
    return null;
  }
};

/** Creates or updates (by `draft.id`) a scenario of the outbreak on this device; it syncs later. */
export async function saveScenario(outbreakId: string, draft: ScenarioDraft, _baseVersion?: number): Promise<ScenarioRecord> {
  const parsed = scenarioRecordInputSchema.safeParse(draft);
  if (!parsed.success) throw new ApiError(400, 'validation_failed', 'Some fields are not valid.', fieldsFromIssues(parsed.error.issues));
  const v = parsed.data;
  const db = await loadDb();
  const existing = v.id ? await db.scenarios.get(v.id) : undefined;
  if (existing?.deletedAt) throw new ApiError(409, 'conflict', 'This scenario was deleted.');
  if (existing && existing.outbreakId !== outbreakId) throw new ApiError(409, 'conflict', 'This scenario id belongs to another outbreak.');
  const now = new Date().toISOString();
  const official = v.official ?? Boolean(existing?.official);
  const record: LocalRecord = {
    ...(existing ?? {}),
    id: existing?.id ?? v.id ?? crypto.randomUUID(),
    version: Number(existing?.version ?? 0),
    changeSeq: Number(existing?.changeSeq ?? 0),
    deletedAt: null,
    outbreakId,
    name: v.name,
    input: v.input,
    official,
    notes: v.notes ?? null,
    createdAt: (existing?.createdAt as string | undefined) ?? now,
    updatedAt: now,
    updatedBy: myId(),
    deviceId: null,
  };
  await (await loadSync()).saveLocal('scenario', record, { outbreakId, name: v.name, input: v.input, notes: v.notes ?? null, ...(v.official !== undefined ? { official: v.official } : {}) });
  return asRecord((await db.scenarios.get(record.id)) ?? record);
}

export async function removeScenario(s: Pick<ScenarioRecord, 'id' | 'version'>): Promise<void> {
  const existing = await (await loadDb()).scenarios.get(s.id);
  if (!existing || existing.deletedAt) return;
  await (await loadSync()).deleteLocal('scenario', existing);
}

/**
 * Makes the scenario the outbreak's official forecast, or withdraws it (forecast:publish). Online:
 * publishing is a decision others act on, so it waits for the server. The scenario's pending local
 * changes are synced first so that the server publishes what the coordinator sees.
 */
export async function publishScenario(id: string, official: boolean): Promise<ScenarioRecord> {
  const db = await loadDb();
  const sync = await loadSync();
  const pending = async () => (await db.outbox.where('entityId').equals(id).count()) > 0;
  for (let i = 0; i < 3 && (await pending()); i++) await sync.requestSync();
  if (await pending()) throw new ApiError(0, 'offline', 'Publishing needs the server: the scenario has not synced yet. Try again when online.');
  const { scenario } = await apiFetch<{ scenario: ScenarioRecord }>(`/api/scenarios/${id}/official`, { method: 'POST', json: { official } });
  await sync.cacheServerRecords('scenario', [scenario as unknown as LocalRecord]);
  void sync.requestSync();
  return scenario;
}
