import { route } from '@/lib/http/handler';
import { getSitrepCached } from '@/lib/db/sitrep';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The sitrep's data: cut-off, cases, curve, growth, Rt, forecast with bands, scenarios, notes. */
export const GET = route({}, async ({ actor, params }) => ({ sitrep: await getSitrepCached(actor, params.id!) }));
