import { route } from '@/lib/http/handler';
import { exportTalliesCsv } from '@/lib/db/tallies';
import { tallyExportQuerySchema } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The filtered tallies as CSV in the import format (`?site=&from=&to=`). */
export const GET = route({ query: tallyExportQuerySchema }, async ({ actor, params, query }) => {
  const csv = await exportTalliesCsv(actor, params.id!, { siteId: query.site, from: query.from, to: query.to });
  const name = `tallies-${query.from ?? 'start'}-${query.to ?? 'latest'}.csv`;
  return new Response(csv, {
    headers: { 'content-type': 'text/csv; charset=utf-8', 'content-disposition': `attachment; filename="${name}"`, 'cache-control': 'no-store' },
  });
});
