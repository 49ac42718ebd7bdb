/**
 * Reads outside a transaction take turns on several SQLite connections (lib/db/connection.ts,
 * READERS): one connection runs one statement at a time, so on a single connection a quick read
 * would wait for a slow one. WAL mode lets readers run beside each other and beside the writer.
 */
import { USING_POSTGRES, prepare } from '../helpers/server';
import { beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';

const { db, writeTx } = await import('@/lib/db/connection');

// A SELECT that keeps one connection busy for a while (a recursive count; no table needed).
const SLOW = 'WITH RECURSIVE c(x) AS (SELECT 1 UNION ALL SELECT x + 1 FROM c WHERE x < 3000000) SELECT COUNT(*) AS n FROM c';

beforeAll(async () => {
  await prepare();
});

describe.skipIf(USING_POSTGRES)('SQLite reads on several connections', () => {
  it('a quick read is answered while a slow read runs, and so is a write', async () => {
    const sequelize = await db();
    const order: string[] = [];
    const slow = sequelize.query<{ n: number }>(SLOW, { type: QueryTypes.SELECT }).then((r) => (order.push('slow'), r));
    // Started after the slow one, on the next reader connection.
    const quick = sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM users', { type: QueryTypes.SELECT }).then((r) => (order.push('quick'), r));
    const write = writeTx(async (t) => sequelize.query('SELECT 1', { transaction: t })).then(() => order.push('write'));
    const [slowRows, quickRows] = await Promise.all([slow, quick, write]);
    expect(Number(slowRows[0]!.n)).toBe(3_000_000);
    expect(Number(quickRows[0]!.n)).toBeGreaterThan(0);
    // On one shared connection the quick read would come after the slow one.
    expect(order.indexOf('quick')).toBeLessThan(order.indexOf('slow'));
    expect(order.indexOf('write')).toBeLessThan(order.indexOf('slow'));
  });

  it('a committed write is seen by every reader connection', async () => {
    const sequelize = await db();
    await writeTx((t) => sequelize.query('CREATE TABLE IF NOT EXISTS zz_reader_probe (k INTEGER PRIMARY KEY)', { transaction: t }));
    await writeTx((t) => sequelize.query('INSERT INTO zz_reader_probe (k) VALUES (42)', { transaction: t }));
    // Six reads in a row cover every reader connection twice.
    const seen = await Promise.all(Array.from({ length: 6 }, () =>
      sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM zz_reader_probe WHERE k = 42', { type: QueryTypes.SELECT })));
    expect(seen.map((r) => Number(r[0]!.n))).toEqual([1, 1, 1, 1, 1, 1]);
  });
});
