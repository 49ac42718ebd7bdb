import type { Sequelize } from 'sequelize';
import { initUser, User } from './user';
import { initOutbreak, Outbreak } from './outbreak';
import { initTeam, Team, TeamMembership, OutbreakMember } from './team';
import { initSite, Site } from './site';
import { initLedger, LedgerEntry, ServerCounter } from './ledger-entry';
import { initTally, Tally, Conflict } from './tally';
import { initScenario, Scenario } from './scenario';
import { initSync, Device, AppliedMutation } from './sync';
import { initMail, MailToken, CapacityAlert, TallySheet } from './mail';

export { User, Outbreak, Team, TeamMembership, OutbreakMember, Site, LedgerEntry, ServerCounter, Tally, Conflict, Scenario, Device, AppliedMutation, MailToken, CapacityAlert, TallySheet };

/**
 * Initialises every model on a connection and declares the associations. Add a new model here
 * (init + associations) and its table in a new file under ./migrations.
 */
export function initModels(sequelize: Sequelize): void {
  initUser(sequelize);
  initOutbreak(sequelize);
  initTeam(sequelize);
  initSite(sequelize);
  initLedger(sequelize);
  initTally(sequelize);
  initScenario(sequelize);
  initSync(sequelize);
  initMail(sequelize);

  Outbreak.hasMany(Team, { foreignKey: 'outbreakId' });
  Team.belongsTo(Outbreak, { foreignKey: 'outbreakId' });
  Outbreak.hasMany(Site, { foreignKey: 'outbreakId' });
  Site.belongsTo(Outbreak, { foreignKey: 'outbreakId' });
  Team.hasMany(Site, { foreignKey: 'teamId' });
  Site.belongsTo(Team, { foreignKey: 'teamId' });
  TeamMembership.belongsTo(Team, { foreignKey: 'teamId' });
  TeamMembership.belongsTo(User, { foreignKey: 'userId' });
  OutbreakMember.belongsTo(Outbreak, { foreignKey: 'outbreakId' });
  OutbreakMember.belongsTo(User, { foreignKey: 'userId' });
  Site.hasMany(Tally, { foreignKey: 'siteId' });
  Tally.belongsTo(Site, { foreignKey: 'siteId' });
  Outbreak.hasMany(Scenario, { foreignKey: 'outbreakId' });
  User.hasMany(Device, { foreignKey: 'userId' });
  Device.belongsTo(User, { foreignKey: 'userId' });
  MailToken.belongsTo(User, { foreignKey: 'userId' });
  TallySheet.belongsTo(Site, { foreignKey: 'siteId' });
}
