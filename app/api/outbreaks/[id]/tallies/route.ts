import { route } from '@/lib/http/handler';
import { listTalliesByOutbreak, upsertTally } from '@/lib/db/tallies';
import { tallyInputSchema } from '@/lib/validation/tally';
import { tallyListQuerySchema, writeAnswer } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Live tallies of the outbreak: `?site=&from=&to=&limit=&offset=&sort=` (sort: date, -date, site, newCases, recordedAt, …). */
export const GET = route({ query: tallyListQuerySchema }, async ({ actor, params, query }) =>
  listTalliesByOutbreak(actor, params.id!, { siteId: query.site, from: query.from, to: query.to, limit: query.limit, offset: query.offset, sort: query.sort }));

/** Records a tally for a site of this outbreak (from the web: no device id). 409 on a conflict. */
export const POST = route({ body: tallyInputSchema }, async ({ actor, params, body }) =>
  writeAnswer(await upsertTally(actor, body, { deviceId: null, outbreakId: params.id! })));
