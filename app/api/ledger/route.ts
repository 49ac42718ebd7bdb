import { route } from '@/lib/http/handler';
import { ledgerNames, listLedgerForActor } from '@/lib/db/ledger';
import { ledgerQuerySchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The sync ledger, newest first, filtered (read-only: no route updates or deletes a row). */
export const GET = route({ query: ledgerQuerySchema }, async ({ actor, query }) => {
  const { rows, total } = await listLedgerForActor(actor, query);
  return { rows, total, names: await ledgerNames(rows) };
});
