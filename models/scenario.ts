import { DataTypes, type Sequelize } from 'sequelize';
import { attributes, ref, syncedFields, type ColumnSpec } from './columns';
import { SyncedModel } from './synced';

/** A saved scenario of an outbreak (PRODUCT.md, "Scenario"): its ScenarioInput as JSON. */
export const scenarioColumns: ColumnSpec = {
  ...syncedFields,
  outbreakId: ref('outbreaks'),
  name: { type: DataTypes.STRING(120), allowNull: false },
  /** JSON of a ScenarioInput (lib/validation/scenario.ts). */
  input: { type: DataTypes.TEXT, allowNull: false },
  /** The outbreak's official forecast (at most one per outbreak), set by a coordinator. */
  official: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
  /** JSON detail of how it was made, e.g. the fit it came from. */
  notes: { type: DataTypes.TEXT, allowNull: true },
};

export class Scenario extends SyncedModel {
  declare outbreakId: string;
  declare name: string;
  declare input: string;
  declare official: boolean;
  declare notes: string | null;
}

export function initScenario(sequelize: Sequelize) {
  Scenario.init(attributes(scenarioColumns), { sequelize, tableName: 'scenarios', modelName: 'Scenario', underscored: true });
}
