import { route } from '@/lib/http/handler';
import { upsertTally } from '@/lib/db/tallies';
import { tallyInputSchema } from '@/lib/validation/tally';
import { writeAnswer } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Records or updates a tally (the outbreak is the site's). With `id` and `baseVersion`: an edit. 409 on a conflict. */
export const POST = route({ body: tallyInputSchema }, async ({ actor, body }) => writeAnswer(await upsertTally(actor, body, { deviceId: null })));
