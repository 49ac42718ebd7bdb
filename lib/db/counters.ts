import type { Transaction } from 'sequelize';
import { ServerCounter } from '@/models';

/**
 * The next value of the server change counter (SYNC.md principle 4). Call inside a write
 * transaction: the value is reserved with the transaction and lost if it rolls back, which
 * leaves gaps but never reorders changes.
 */
export async function nextChangeSeq(t: Transaction): Promise<number> {
  const [row] = await ServerCounter.findOrCreate({ where: { name: 'change' }, defaults: { name: 'change', value: 0 }, transaction: t });
  await row.increment('value', { by: 1, transaction: t });
  await row.reload({ transaction: t });
  return Number(row.value);
}

/** The highest change counter handed out so far (0 on an empty database). */
export async function currentChangeSeq(t?: Transaction): Promise<number> {
  const row = await ServerCounter.findByPk('change', { transaction: t });
  return row ? Number(row.value) : 0;
}
