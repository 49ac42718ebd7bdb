import { DataTypes, Model, type Sequelize } from 'sequelize';
import { attributes, type ColumnSpec } from './columns';

/**
 * One installation of the app (a tablet's browser profile), made on the device and registered for
 * the signed-in user (SYNC.md principle 2). `highestSeq` is the last mutation seq the server
 * recorded from it: the next push must start right after it (a gap is refused).
 */
export const deviceColumns: ColumnSpec = {
  /** Client-made UUID. */
  id: { type: DataTypes.STRING(64), primaryKey: true, allowNull: false },
  userId: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
  /** What the officer calls the tablet (shown on the merge desk and in the ledger). */
  label: { type: DataTypes.STRING(80), allowNull: false },
  lastSeenAt: { type: DataTypes.DATE, allowNull: true },
  /** Highest mutation seq recorded from this device; 0 before the first push. */
  highestSeq: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
  createdAt: { type: DataTypes.DATE, allowNull: false },
  updatedAt: { type: DataTypes.DATE, allowNull: false },
};

export class Device extends Model {
  declare id: string;
  declare userId: string;
  declare label: string;
  declare lastSeenAt: Date | null;
  declare highestSeq: number;
  declare createdAt: Date;
  declare updatedAt: Date;
}

/**
 * Every mutation the server has recorded, keyed by the device-made `mutationId` (SYNC.md principle
 * 3). `result` is the exact answer sent back, so a resent mutation gets the same answer and
 * changes nothing. Never updated or deleted.
 */
export const appliedMutationColumns: ColumnSpec = {
  mutationId: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  deviceId: { type: DataTypes.STRING(64), allowNull: false },
  seq: { type: DataTypes.INTEGER, allowNull: false },
  entity: { type: DataTypes.STRING(32), allowNull: false },
  entityId: { type: DataTypes.UUID, allowNull: false },
  /** applied, duplicate, conflict, rejected. */
  fate: { type: DataTypes.STRING(16), allowNull: false },
  reason: { type: DataTypes.STRING(64), allowNull: true },
  /** JSON of the PushResult returned for this mutation. */
  result: { type: DataTypes.TEXT, allowNull: false },
  appliedAt: { type: DataTypes.DATE, allowNull: false },
};

export class AppliedMutation extends Model {
  declare mutationId: string;
  declare deviceId: string;
  declare seq: number;
  declare entity: string;
  declare entityId: string;
  declare fate: string;
  declare reason: string | null;
  declare result: string;
  declare appliedAt: Date;
}

export function initSync(sequelize: Sequelize) {
  Device.init(attributes(deviceColumns), { sequelize, tableName: 'devices', modelName: 'Device', underscored: true });
  AppliedMutation.init(attributes(appliedMutationColumns), {
    sequelize, tableName: 'applied_mutations', modelName: 'AppliedMutation', underscored: true, timestamps: false,
  });
}
