import { DataTypes, Model, type Sequelize } from 'sequelize';
import { attributes, ref, syncedFields, type ColumnSpec } from './columns';
import { SyncedModel } from './synced';

/**
 * The count for one site on one day (PRODUCT.md, "Tally"). At most one live tally per site and
 * day (a partial unique index in the migration); "0 new cases" is a value, no row is "no report".
 */
export const tallyColumns: ColumnSpec = {
  ...syncedFields,
  outbreakId: ref('outbreaks'),
  siteId: ref('sites'),
  /** Calendar day, `YYYY-MM-DD`, stored as text so no time zone can move it. */
  date: { type: DataTypes.STRING(10), allowNull: false },
  /** New cases seen that day, people. */
  newCases: { type: DataTypes.INTEGER, allowNull: false },
  /** New recoveries, deaths and admissions that day, people; null when not known. */
  recoveries: { type: DataTypes.INTEGER, allowNull: true },
  deaths: { type: DataTypes.INTEGER, allowNull: true },
  admissions: { type: DataTypes.INTEGER, allowNull: true },
  /** Short note about the count (never patient data). */
  note: { type: DataTypes.STRING(280), allowNull: true },
  /** Who recorded the first version, and when on the device. */
  recordedBy: { type: DataTypes.UUID, allowNull: true },
  recordedAt: { type: DataTypes.DATE, allowNull: true },
};

export class Tally extends SyncedModel {
  declare outbreakId: string;
  declare siteId: string;
  declare date: string;
  declare newCases: number;
  declare recoveries: number | null;
  declare deaths: number | null;
  declare admissions: number | null;
  declare note: string | null;
  declare recordedBy: string | null;
  declare recordedAt: Date | null;
}

/**
 * A disagreement kept for the merge desk (SYNC.md principle 5): the server's current value stays,
 * the incoming one is stored here until a coordinator settles it. Never deleted.
 */
export const conflictColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  outbreakId: ref('outbreaks'),
  /** 'tally' (other synced entities may follow). */
  entity: { type: DataTypes.STRING(32), allowNull: false },
  /** The server record the incoming change disagrees with. */
  entityId: { type: DataTypes.UUID, allowNull: false },
  /** 'stale_version' (edit against an old version), 'duplicate_day' (two creates for one site and day), 'edit_deleted'. */
  reason: { type: DataTypes.STRING(32), allowNull: false },
  /** JSON: the incoming payload as the device sent it. */
  incoming: { type: DataTypes.TEXT, allowNull: false },
  /** JSON: the server's record when the conflict arose. */
  current: { type: DataTypes.TEXT, allowNull: true },
  incomingVersion: { type: DataTypes.INTEGER, allowNull: true },
  currentVersion: { type: DataTypes.INTEGER, allowNull: true },
  mutationId: { type: DataTypes.UUID, allowNull: true },
  deviceId: { type: DataTypes.STRING(64), allowNull: true },
  userId: { type: DataTypes.UUID, allowNull: true },
  recordedAt: { type: DataTypes.DATE, allowNull: true },
  /** 'open' or 'settled'. */
  status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'open' },
  /** keep_current, keep_incoming, sum, corrected. */
  settlement: { type: DataTypes.STRING(16), allowNull: true },
  settledBy: { type: DataTypes.UUID, allowNull: true },
  settledAt: { type: DataTypes.DATE, allowNull: true },
  settleReason: { type: DataTypes.STRING(500), allowNull: true },
  /** Bumped on settlement: a second settler with the old value gets 409. */
  version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
  createdAt: { type: DataTypes.DATE, allowNull: false },
  updatedAt: { type: DataTypes.DATE, allowNull: false },
};

export class Conflict extends Model {
  declare id: string;
  declare outbreakId: string;
  declare entity: string;
  declare entityId: string;
  declare reason: string;
  declare incoming: string;
  declare current: string | null;
  declare incomingVersion: number | null;
  declare currentVersion: number | null;
  declare mutationId: string | null;
  declare deviceId: string | null;
  declare userId: string | null;
  declare recordedAt: Date | null;
  declare status: 'open' | 'settled';
  declare settlement: string | null;
  declare settledBy: string | null;
  declare settledAt: Date | null;
  declare settleReason: string | null;
  declare version: number;
  declare createdAt: Date;
  declare updatedAt: Date;
}

export function initTally(sequelize: Sequelize) {
  Tally.init(attributes(tallyColumns), { sequelize, tableName: 'tallies', modelName: 'Tally', underscored: true });
  Conflict.init(attributes(conflictColumns), { sequelize, tableName: 'conflicts', modelName: 'Conflict', underscored: true });
}
