import { route } from '@/lib/http/handler';
import { createSite, listSitesByOutbreak } from '@/lib/db/outbreaks';
import { siteInputSchema } from '@/lib/validation/outbreak';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor, params }) => ({ sites: await listSitesByOutbreak(actor, params.id!) }));

export const POST = route({ body: siteInputSchema.omit({ outbreakId: true }) }, async ({ actor, body, params }) => ({
  site: await createSite(actor, { ...body, outbreakId: params.id! }),
}));
