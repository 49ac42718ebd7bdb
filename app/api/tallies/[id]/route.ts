import { route } from '@/lib/http/handler';
import { deleteTally, getTallyById, upsertTally } from '@/lib/db/tallies';
import { tallyInputSchema } from '@/lib/validation/tally';
import { deleteQuerySchema, writeAnswer } from '@/lib/tallies/query';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

export const GET = route({}, async ({ actor, params }) => ({ tally: await getTallyById(actor, params.id!) }));

/** An edit of this tally: send `baseVersion`, the version you opened. 409 on a conflict. */
export const PUT = route({ body: tallyInputSchema.omit({ id: true }) }, async ({ actor, params, body }) =>
  writeAnswer(await upsertTally(actor, { ...body, id: params.id! }, { deviceId: null })));

/** Deletes as a tombstone: `?baseVersion=` the version you saw. 409 on a conflict. */
export const DELETE = route({ query: deleteQuerySchema }, async ({ actor, params, query }) =>
  writeAnswer(await deleteTally(actor, params.id!, { baseVersion: query.baseVersion, deviceId: null })));
