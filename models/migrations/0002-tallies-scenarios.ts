import type { QueryInterface } from 'sequelize';
import { columns } from '../columns';
import { conflictColumns, tallyColumns } from '../tally';
import { scenarioColumns } from '../scenario';

export const name = '0002-tallies-scenarios';

export async function up(q: QueryInterface): Promise<void> {
  await q.createTable('tallies', columns(tallyColumns));
  // At most one live tally per site and day; tombstones do not count (partial index: SQLite and PostgreSQL).
  await q.addIndex('tallies', ['site_id', 'date'], { unique: true, where: { deleted_at: null }, name: 'tallies_site_day_live' });
  await q.addIndex('tallies', ['outbreak_id', 'date']);
  await q.addIndex('tallies', ['change_seq']);
  await q.createTable('conflicts', columns(conflictColumns));
  await q.addIndex('conflicts', ['outbreak_id', 'status']);
  await q.addIndex('conflicts', ['entity_id']);
  await q.createTable('scenarios', columns(scenarioColumns));
  await q.addIndex('scenarios', ['outbreak_id']);
  await q.addIndex('scenarios', ['change_seq']);
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['scenarios', 'conflicts', 'tallies']) await q.dropTable(t);
}
