import { DataTypes, Model, type Sequelize } from 'sequelize';
import { attributes, timestamps, type ColumnSpec } from './columns';
import type { Role } from '@/lib/auth/roles';

export const userColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
  name: { type: DataTypes.STRING(120), allowNull: false },
  passwordHash: { type: DataTypes.STRING(100), allowNull: true },
  role: { type: DataTypes.STRING(16), allowNull: false },
  active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
  /** Bumped on a role change, a team change or deactivation: open sessions are then refused. */
  sessionVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
  ...timestamps,
};

export class User extends Model {
  declare id: string;
  declare email: string;
  declare name: string;
  declare passwordHash: string | null;
  declare role: Role;
  declare active: boolean;
  declare sessionVersion: number;
  declare createdAt: Date;
  declare updatedAt: Date;
}

export function initUser(sequelize: Sequelize) {
  User.init(attributes(userColumns), { sequelize, tableName: 'users', modelName: 'User', underscored: true });
}
