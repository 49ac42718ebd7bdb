import { DataTypes, type ModelAttributeColumnOptions } from 'sequelize';

/**
 * Column definitions written once and used twice: by the Sequelize model (camelCase attribute with
 * a snake_case `field`) and by the migration that creates the table (snake_case column names).
 */
export type ColumnSpec = Record<string, ModelAttributeColumnOptions>;

const snake = (s: string) => s.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);

/** For `Model.init`: camelCase attributes mapped to snake_case fields. */
export function attributes(spec: ColumnSpec): ColumnSpec {
  return Object.fromEntries(Object.entries(spec).map(([k, v]) => [k, { ...v, field: snake(k) }]));
}

/** For `queryInterface.createTable`: snake_case column names, references kept. */
export function columns(spec: ColumnSpec): ColumnSpec {
  return Object.fromEntries(Object.entries(spec).map(([k, v]) => [snake(k), { ...v }]));
}

export const timestamps: ColumnSpec = {
  createdAt: { type: DataTypes.DATE, allowNull: false },
  updatedAt: { type: DataTypes.DATE, allowNull: false },
};

/**
 * The fields every synced record carries (SYNC.md): the id is a UUID made on the client;
 * `version` counts server versions of this record (1 on create); `changeSeq` is the server change
 * counter at the last change (pull is ordered by it); `deletedAt` marks a tombstone; `updatedBy` is
 * the user and `deviceId` the installation that made the last change.
 */
export const syncedFields: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
  changeSeq: { type: DataTypes.BIGINT, allowNull: false },
  ...timestamps,
  deletedAt: { type: DataTypes.DATE, allowNull: true },
  updatedBy: { type: DataTypes.UUID, allowNull: true },
  deviceId: { type: DataTypes.STRING(64), allowNull: true },
};

export const ref = (table: string, opts: { allowNull?: boolean; onDelete?: string } = {}): ModelAttributeColumnOptions => ({
  type: DataTypes.UUID,
  allowNull: opts.allowNull ?? false,
  references: { model: table, key: 'id' },
  onDelete: opts.onDelete ?? 'RESTRICT',
});
