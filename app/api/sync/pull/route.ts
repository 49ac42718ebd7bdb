import { route } from '@/lib/http/handler';
import { pullChanges } from '@/lib/db/sync';
import { pullQuerySchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** SYNC.md pull: the changes the user may see after `cursor`, in server order, tombstones included. */
export const GET = route({ query: pullQuerySchema }, async ({ actor, query, req }) =>
  pullChanges(actor, { cursor: query.cursor, limit: query.limit, deviceId: req.headers.get('x-device-id') }),
);
