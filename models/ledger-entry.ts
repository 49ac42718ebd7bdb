import { DataTypes, Model, type Sequelize } from 'sequelize';
import { attributes, type ColumnSpec } from './columns';

/**
 * One row of the append-only sync ledger (SYNC.md principle 7). Rows are only ever inserted;
 * each carries the hash of the previous row so that an edited or removed row is detectable.
 */
export const ledgerEntryColumns: ColumnSpec = {
  id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
  at: { type: DataTypes.DATE, allowNull: false },
  /** push, pull, conflict, settlement, sign_in, invite, reset, sitrep, … */
  kind: { type: DataTypes.STRING(32), allowNull: false },
  userId: { type: DataTypes.UUID, allowNull: true },
  deviceId: { type: DataTypes.STRING(64), allowNull: true },
  outbreakId: { type: DataTypes.UUID, allowNull: true },
  /** Counts of the action, e.g. { applied, duplicate, conflict, rejected } for a push. */
  counts: { type: DataTypes.TEXT, allowNull: true },
  /** Wall time the action took, milliseconds. */
  durationMs: { type: DataTypes.INTEGER, allowNull: true },
  /** Free-form JSON detail (never patient data). */
  detail: { type: DataTypes.TEXT, allowNull: true },
  prevHash: { type: DataTypes.STRING(64), allowNull: false },
  hash: { type: DataTypes.STRING(64), allowNull: false },
};

export class LedgerEntry extends Model {
  declare id: number;
  declare at: Date;
  declare kind: string;
  declare userId: string | null;
  declare deviceId: string | null;
  declare outbreakId: string | null;
  declare counts: string | null;
  declare durationMs: number | null;
  declare detail: string | null;
  declare prevHash: string;
  declare hash: string;
}

export const serverCounterColumns: ColumnSpec = {
  name: { type: DataTypes.STRING(32), primaryKey: true },
  value: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
};

export class ServerCounter extends Model {
  declare name: string;
  declare value: number;
}

export function initLedger(sequelize: Sequelize) {
  LedgerEntry.init(attributes(ledgerEntryColumns), {
    sequelize, tableName: 'ledger_entries', modelName: 'LedgerEntry', underscored: true, timestamps: false,
  });
  ServerCounter.init(attributes(serverCounterColumns), {
    sequelize, tableName: 'server_counters', modelName: 'ServerCounter', underscored: true, timestamps: false,
  });
}
