import { z } from 'zod';
import { route } from '@/lib/http/handler';
import { sendSitrep } from '@/lib/db/sitrep';
import { checkCapacityAlert } from '@/lib/db/alerts';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** "Send to coordinators": the key figures and a link, by e-mail; a ledger row names who sent what. */
export const POST = route({ body: z.strictObject({}) }, async ({ actor, params }) => {
  const result = await sendSitrep(actor, params.id!);
  // A coordinator looking at the numbers is a good moment to re-check capacity (it alerts at most once per forecast).
  const alert = await checkCapacityAlert(params.id!).catch(() => null);
  return { ...result, capacityAlert: alert?.status ?? null };
});
