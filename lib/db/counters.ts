import { QueryTypes, type Transaction } from 'sequelize';
import { ServerCounter } from '@/models';
import { db } from './connection';

/**
 * The next value of the server change counter (SYNC.md principle 4). Call inside a write
 * transaction: the value is reserved with the transaction and lost if it rolls back, which
 * leaves gaps but never reorders changes.
 */
export async function nextChangeSeq(t: Transaction): Promise<number> {
  return reserveChangeSeqs(t, 1);
}

/** Reserves `n` consecutive counter values (bulk writes such as an import); returns the first. */
export async function reserveChangeSeqs(t: Transaction, n: number): Promise<number> {
  // One statement (UPDATE … RETURNING, SQLite 3.35+ and PostgreSQL): every write of a sync push
  // takes a value, so the round trips count; the row is made on the very first change.
  const sequelize = await db();
  const [row] = await sequelize.query<{ value: number | string }>(
    "UPDATE server_counters SET value = value + :n WHERE name = 'change' RETURNING value", { type: QueryTypes.SELECT, replacements: { n }, transaction: t });
  if (row) return Number(row.value) - n + 1;
  await ServerCounter.create({ name: 'change', value: n }, { transaction: t });
  return 1;
}

/** The highest change counter handed out so far (0 on an empty database). */
export async function currentChangeSeq(t?: Transaction): Promise<number> {
  const row = await ServerCounter.findByPk('change', { transaction: t });
  return row ? Number(row.value) : 0;
}
