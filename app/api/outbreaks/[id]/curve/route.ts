import { route } from '@/lib/http/handler';
import { getEpiCurve } from '@/lib/db/curve';
import { curveQuerySchema } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The epi curve of the outbreak, or of one site with `?site=`; `?today=` is the client's calendar day. */
export const GET = route({ query: curveQuerySchema }, async ({ actor, params, query }) => ({
  curve: await getEpiCurve(actor, params.id!, { siteId: query.site, today: query.today }),
}));
