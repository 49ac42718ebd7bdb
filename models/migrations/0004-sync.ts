import type { QueryInterface } from 'sequelize';
import { columns } from '../columns';
import { appliedMutationColumns, deviceColumns } from '../sync';

export const name = '0004-sync';

export async function up(q: QueryInterface): Promise<void> {
  await q.createTable('devices', columns(deviceColumns));
  await q.addIndex('devices', ['user_id']);
  await q.createTable('applied_mutations', columns(appliedMutationColumns));
  // One mutation per device and seq: a second one with a used seq cannot be recorded.
  await q.addIndex('applied_mutations', ['device_id', 'seq'], { unique: true });
  await q.addIndex('applied_mutations', ['entity_id']);
}

export async function down(q: QueryInterface): Promise<void> {
  await q.dropTable('applied_mutations');
  await q.dropTable('devices');
}
