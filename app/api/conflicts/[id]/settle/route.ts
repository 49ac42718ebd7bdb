import { route } from '@/lib/http/handler';
import { settleConflict } from '@/lib/db/conflicts';
import { notFound } from '@/lib/http/errors';
import { uuidSchema } from '@/lib/validation/common';
import { settleConflictSchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Settles one conflict with a required reason; 409 when someone settled it first or the tally moved. */
export const POST = route({ body: settleConflictSchema }, async ({ actor, body, params }) => {
  if (!uuidSchema.safeParse(params.id).success) throw notFound('Conflict');
  return settleConflict(actor, params.id!, body);
});
