import type { Transaction } from 'sequelize';
import { ServerCounter } from '@/models';

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
  const [row] = await ServerCounter.findOrCreate({ where: { name: 'change' }, defaults: { name: 'change', value: 0 }, transaction: t });
  await row.increment('value', { by: n, transaction: t });
  await row.reload({ transaction: t });
  return Number(row.value) - n + 1;
}

/** The highest change counter handed out so far (0 on an empty database). */
export async function currentChangeSeq(t?: Transaction): Promise<number> {
  const row = await ServerCounter.findByPk('change', { transaction: t });
  return row ? Number(row.value) : 0;
}
