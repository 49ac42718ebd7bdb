import { z } from 'zod';
import { route } from '@/lib/http/handler';
import { runCapacityCheck } from '@/lib/db/alerts';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/**
 * Checks the official forecast against the beds and sends the capacity alert when due (once per
 * forecast version). Call it right after a forecast is published.
 */
export const POST = route({ body: z.strictObject({}) }, async ({ actor, params }) => ({ check: await runCapacityCheck(actor, params.id!) }));
