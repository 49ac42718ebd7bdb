import { route } from '@/lib/http/handler';
import { listConflicts } from '@/lib/db/conflicts';
import { conflictListQuerySchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The merge desk's conflicts of an outbreak (coordinators). */
export const GET = route({ query: conflictListQuerySchema }, async ({ actor, query }) => ({
  conflicts: await listConflicts(actor, query.outbreak, query.status),
}));
