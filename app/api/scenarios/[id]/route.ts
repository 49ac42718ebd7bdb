import { z } from 'zod';
import { route } from '@/lib/http/handler';
import { deleteScenario, getScenario, upsertScenario } from '@/lib/db/scenarios';
import { scenarioRecordInputSchema } from '@/lib/validation/scenario-record';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor, params }) => ({ scenario: await getScenario(actor, params.id!) }));

/** Updates a saved scenario; send `baseVersion` (the version you loaded) to be told of a concurrent change (409). */
export const PUT = route({ body: scenarioRecordInputSchema.omit({ id: true }) }, async ({ actor, body, params }) => {
  const current = await getScenario(actor, params.id!);
  const { baseVersion, ...rest } = body;
  const ctx = baseVersion === undefined ? { deviceId: null } : { deviceId: null, baseVersion };
  return { scenario: await upsertScenario(actor, { ...rest, id: current.id, outbreakId: current.outbreakId }, ctx) };
});

const deleteQuery = z.object({ baseVersion: z.coerce.number().int().min(1).optional() });

/** Tombstones the scenario (scenario:write; the official one needs forecast:publish). */
export const DELETE = route({ query: deleteQuery }, async ({ actor, query, params }) => {
  const ctx = query.baseVersion === undefined ? { deviceId: null } : { deviceId: null, baseVersion: query.baseVersion };
  return { scenario: await deleteScenario(actor, params.id!, ctx) };
});
