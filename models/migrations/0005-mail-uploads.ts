import type { QueryInterface } from 'sequelize';
import { columns } from '../columns';
import { capacityAlertColumns, mailTokenColumns, tallySheetColumns } from '../mail';

export const name = '0005-mail-uploads';

export async function up(q: QueryInterface): Promise<void> {
  await q.createTable('mail_tokens', columns(mailTokenColumns));
  await q.addIndex('mail_tokens', ['user_id', 'kind']);
  await q.createTable('capacity_alerts', columns(capacityAlertColumns));
  // Once per forecast version: the database refuses a second alert even if two checks race.
  await q.addIndex('capacity_alerts', ['scenario_id', 'scenario_version'], { unique: true, name: 'capacity_alerts_once' });
  await q.createTable('tally_sheets', columns(tallySheetColumns));
  await q.addIndex('tally_sheets', ['site_id', 'date']);
  await q.addIndex('tally_sheets', ['outbreak_id', 'date']);
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['tally_sheets', 'capacity_alerts', 'mail_tokens']) await q.dropTable(t);
}
