import type { Sequelize } from 'sequelize';
import { Umzug, SequelizeStorage } from 'umzug';
import * as m0001 from './0001-foundation';
import * as m0002 from './0002-tallies-scenarios';
import * as m0003 from './0003-tally-indexes';
import * as m0004 from './0004-sync';
import * as m0005 from './0005-mail-uploads';

/**
 * Every migration, in order. Listed here rather than found by a file glob so that the bundled
 * server (Next) and the scripts run the same list. Add yours at the end; never edit a landed one.
 */
const MIGRATIONS = [
  m0001,
  m0002,
  m0003,
  m0004,
  m0005,
];

export function migrator(sequelize: Sequelize) {
  const q = sequelize.getQueryInterface();
  return new Umzug({
    migrations: MIGRATIONS.map((m) => ({ name: m.name, up: () => m.up(q), down: () => m.down(q) })),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/** Applies pending migrations; safe to call on every start. */
export async function migrate(sequelize: Sequelize): Promise<void> {
  await migrator(sequelize).up();
}
