import { route } from '@/lib/http/handler';
import { listScenarios, upsertScenario } from '@/lib/db/scenarios';
import { scenarioRecordInputSchema } from '@/lib/validation/scenario-record';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The outbreak's live scenarios (scenario:read), the official one first. */
export const GET = route({}, async ({ actor, params }) => ({ scenarios: await listScenarios(actor, params.id!) }));

/** Saves a scenario (scenario:write; `official: true` needs forecast:publish). Idempotent by client-made `id`. */
export const POST = route({ body: scenarioRecordInputSchema }, async ({ actor, body, params }) => {
  const { baseVersion, ...rest } = body;
  const ctx = baseVersion === undefined ? { deviceId: null } : { deviceId: null, baseVersion };
  return { scenario: await upsertScenario(actor, { ...rest, outbreakId: params.id! }, ctx) };
});
