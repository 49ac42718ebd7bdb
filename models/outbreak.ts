import { DataTypes, type Sequelize } from 'sequelize';
import { attributes, syncedFields, type ColumnSpec } from './columns';
import { SyncedModel } from './synced';

export const outbreakColumns: ColumnSpec = {
  ...syncedFields,
  name: { type: DataTypes.STRING(120), allowNull: false },
  /** Disease label as the response names it, e.g. "Influenza-like illness". */
  disease: { type: DataTypes.STRING(120), allowNull: false },
  area: { type: DataTypes.STRING(120), allowNull: false },
  /** People in the outbreak's area (N of the models). */
  population: { type: DataTypes.INTEGER, allowNull: false },
  /** Calendar day 0 of the outbreak, ISO `YYYY-MM-DD` (no time zone). */
  startDate: { type: DataTypes.DATEONLY, allowNull: false },
  /** Hospital beds available to the response, people; null when unknown. */
  beds: { type: DataTypes.INTEGER, allowNull: true },
};

export class Outbreak extends SyncedModel {
  declare name: string;
  declare disease: string;
  declare area: string;
  declare population: number;
  declare startDate: string;
  declare beds: number | null;
}

export function initOutbreak(sequelize: Sequelize) {
  Outbreak.init(attributes(outbreakColumns), { sequelize, tableName: 'outbreaks', modelName: 'Outbreak', underscored: true });
}
