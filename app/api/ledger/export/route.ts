import { route } from '@/lib/http/handler';
import { authorize } from '@/lib/auth/permissions';
import { ledgerNames, ledgerToCsv, listLedgerForActor } from '@/lib/db/ledger';
import { ledgerQuerySchema } from '@/lib/validation/sync';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** The filtered ledger as CSV (supervisors: ledger:export). */
export const GET = route({ query: ledgerQuerySchema }, async ({ actor, query }) => {
  authorize(actor, 'ledger:export');
  const { rows } = await listLedgerForActor(actor, { ...query, limit: query.limit ?? 5000 });
  const csv = ledgerToCsv(rows, await ledgerNames(rows));
  return new Response(csv, {
    headers: {
      'content-type': 'text/csv; charset=utf-8',
      'content-disposition': `attachment; filename="ebbcast-sync-ledger-${new Date().toISOString().slice(0, 10)}.csv"`,
      'cache-control': 'no-store',
    },
  });
});
