import type { QueryInterface } from 'sequelize';
import { columns } from '../columns';
import { userColumns } from '../user';
import { outbreakColumns } from '../outbreak';
import { teamColumns, teamMembershipColumns, outbreakMemberColumns } from '../team';
import { siteColumns } from '../site';
import { ledgerEntryColumns, serverCounterColumns } from '../ledger-entry';

export const name = '0001-foundation';

export async function up(q: QueryInterface): Promise<void> {
  await q.createTable('users', columns(userColumns));
  await q.createTable('outbreaks', columns(outbreakColumns));
  await q.createTable('teams', columns(teamColumns));
  await q.createTable('team_memberships', columns(teamMembershipColumns));
  await q.addIndex('team_memberships', ['team_id', 'user_id'], { unique: true });
  await q.createTable('outbreak_members', columns(outbreakMemberColumns));
  await q.addIndex('outbreak_members', ['outbreak_id', 'user_id'], { unique: true });
  await q.createTable('sites', columns(siteColumns));
  await q.addIndex('sites', ['outbreak_id']);
  await q.addIndex('sites', ['team_id']);
  for (const t of ['outbreaks', 'teams', 'sites']) await q.addIndex(t, ['change_seq']);
  await q.createTable('ledger_entries', columns(ledgerEntryColumns));
  await q.addIndex('ledger_entries', ['at']);
  await q.addIndex('ledger_entries', ['user_id']);
  await q.createTable('server_counters', columns(serverCounterColumns));
}

export async function down(q: QueryInterface): Promise<void> {
  for (const t of ['server_counters', 'ledger_entries', 'sites', 'outbreak_members', 'team_memberships', 'teams', 'outbreaks', 'users']) {
    await q.dropTable(t);
  }
}
