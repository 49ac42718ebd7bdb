import { route } from '@/lib/http/handler';
import { pushMutations } from '@/lib/db/sync';
import { PUSH_MAX_BYTES, pushBodySchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** SYNC.md push: one batch of a device's outbox, applied in one transaction; each mutation's fate. */
export const POST = route({ body: pushBodySchema, maxBytes: PUSH_MAX_BYTES }, async ({ actor, body }) => pushMutations(actor, body));
