import { DataTypes, Model, type Sequelize } from 'sequelize';
import { attributes, ref, syncedFields, timestamps, type ColumnSpec } from './columns';
import { SyncedModel } from './synced';

export const teamColumns: ColumnSpec = {
  ...syncedFields,
  outbreakId: ref('outbreaks'),
  name: { type: DataTypes.STRING(120), allowNull: false },
};

export class Team extends SyncedModel {
  declare outbreakId: string;
  declare name: string;
}

/** A field officer's place in a team; their sites are the team's sites. */
export const teamMembershipColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  teamId: ref('teams', { onDelete: 'CASCADE' }),
  userId: ref('users', { onDelete: 'CASCADE' }),
  ...timestamps,
};

export class TeamMembership extends Model {
  declare id: string;
  declare teamId: string;
  declare userId: string;
}

/** A coordinator's or supervisor's responsibility for an outbreak (their scope). */
export const outbreakMemberColumns: ColumnSpec = {
  id: { type: DataTypes.UUID, primaryKey: true, allowNull: false },
  outbreakId: ref('outbreaks', { onDelete: 'CASCADE' }),
  userId: ref('users', { onDelete: 'CASCADE' }),
  ...timestamps,
};

export class OutbreakMember extends Model {
  declare id: string;
  declare outbreakId: string;
  declare userId: string;
}

export function initTeam(sequelize: Sequelize) {
  Team.init(attributes(teamColumns), { sequelize, tableName: 'teams', modelName: 'Team', underscored: true });
  TeamMembership.init(attributes(teamMembershipColumns), {
    sequelize, tableName: 'team_memberships', modelName: 'TeamMembership', underscored: true,
  });
  OutbreakMember.init(attributes(outbreakMemberColumns), {
    sequelize, tableName: 'outbreak_members', modelName: 'OutbreakMember', underscored: true,
  });
}
