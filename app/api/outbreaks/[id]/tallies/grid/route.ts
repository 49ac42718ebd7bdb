import { route } from '@/lib/http/handler';
import { getReportingGrid } from '@/lib/db/tallies';
import { gridQuerySchema } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Which sites reported on which days, `?from=&to=` (default the last 21 days, from day 0 at the earliest). */
export const GET = route({ query: gridQuerySchema }, async ({ actor, params, query }) => getReportingGrid(actor, params.id!, query));
