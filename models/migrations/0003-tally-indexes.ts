import type { QueryInterface } from 'sequelize';

export const name = '0003-tally-indexes';

/**
 * The epi curve sums new cases of an outbreak's live tallies per day. This partial index holds
 * every column that query reads, so it is answered from the index alone (no table lookups over
 * 200,000 rows): bench/tallies.bench.ts measures it.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.addIndex('tallies', ['outbreak_id', 'date', 'site_id', 'new_cases'], { where: { deleted_at: null }, name: 'tallies_curve_live' });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.removeIndex('tallies', 'tallies_curve_live');
}
