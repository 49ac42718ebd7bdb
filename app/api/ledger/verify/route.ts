import { route } from '@/lib/http/handler';
import { authorize } from '@/lib/auth/permissions';
import { verifyLedger } from '@/lib/db/ledger';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Recomputes the ledger's hash chain: `ok: false` names the first row that was altered or removed. */
export const GET = route({}, async ({ actor }) => {
  authorize(actor, 'ledger:read');
  return verifyLedger();
});
