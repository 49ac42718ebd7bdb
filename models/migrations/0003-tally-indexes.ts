import type { QueryInterface } from 'sequelize';

export const name = '0003-tally-indexes';

/**
 * The epi curve sums new cases of an outbreak's live tallies per day. This index holds every
 * column that query reads, in the order it reads them (outbreak, live, day), so SQLite answers it
 * from the index alone, already grouped by day, with no table lookups over 200,000 rows.
 * Not a partial index: SQLite does not treat a partial index as covering when the WHERE names a
 * column the index does not hold (`deleted_at`), measured with EXPLAIN QUERY PLAN.
 * bench/tallies.bench.ts measures the query.
 */
export async function up(q: QueryInterface): Promise<void> {
  await q.addIndex('tallies', ['outbreak_id', 'deleted_at', 'date', 'new_cases', 'site_id'], { name: 'tallies_curve' });
}

export async function down(q: QueryInterface): Promise<void> {
  await q.removeIndex('tallies', 'tallies_curve');
}
