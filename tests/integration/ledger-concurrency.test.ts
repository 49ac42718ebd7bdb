/**
 * The sync ledger's hash chain under concurrent appends. On SQLite the write lock serialises them;
 * on PostgreSQL (several app servers, no write lock) each append must still see the row before it.
 */
import { USING_POSTGRES, prepare } from '../helpers/server';
import { beforeAll, expect, it } from 'vitest';

const { recordLedger, verifyLedger } = await import('@/lib/db/ledger');

beforeAll(prepare);

it(`keeps the chain intact when 40 appends race (${USING_POSTGRES ? 'PostgreSQL' : 'SQLite'})`, async () => {
  const before = await verifyLedger();
  expect(before.ok).toBe(true);
  const rows = await Promise.all(Array.from({ length: 40 }, (_, i) => recordLedger({ kind: 'sign_in', detail: { race: i } })));
  // Every row links to a distinct predecessor: no two appends read the same last row.
  expect(new Set(rows.map((r) => r.prevHash)).size).toBe(40);
  const after = await verifyLedger();
  expect(after).toEqual({ ok: true, rows: before.rows + 40 });
});
