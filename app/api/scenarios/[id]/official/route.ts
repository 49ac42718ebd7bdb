import { route } from '@/lib/http/handler';
import { setOfficial } from '@/lib/db/scenarios';
import { scenarioOfficialSchema } from '@/lib/validation/scenario-record';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Publishes (or withdraws) the outbreak's official forecast: coordinators only (forecast:publish). */
export const POST = route({ body: scenarioOfficialSchema }, async ({ actor, body, params }) => ({
  scenario: await setOfficial(actor, params.id!, body.official),
}));
