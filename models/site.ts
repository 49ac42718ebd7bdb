import { DataTypes, type Sequelize } from 'sequelize';
import { attributes, ref, syncedFields, type ColumnSpec } from './columns';
import { SyncedModel } from './synced';
import type { SiteKind } from '@/lib/validation/outbreak';


export const siteColumns: ColumnSpec = {
  ...syncedFields,
  outbreakId: ref('outbreaks'),
  /** The team whose field officers record this site; null while unassigned. */
  teamId: ref('teams', { allowNull: true, onDelete: 'SET NULL' }),
  name: { type: DataTypes.STRING(120), allowNull: false },
  kind: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'other' },
  /** People living or staying at the site. */
  population: { type: DataTypes.INTEGER, allowNull: false },
};

export class Site extends SyncedModel {
  declare outbreakId: string;
  declare teamId: string | null;
  declare name: string;
  declare kind: SiteKind;
  declare population: number;
}

export function initSite(sequelize: Sequelize) {
  Site.init(attributes(siteColumns), { sequelize, tableName: 'sites', modelName: 'Site', underscored: true });
}
