import { Umzug, SequelizeStorage, type MigrationFn } from 'umzug';
import type { QueryInterface, Sequelize } from 'sequelize';
import * as m0001 from './migrations/0001-people-and-machines';

export interface Migration {
  up: MigrationFn<QueryInterface>;
  down: MigrationFn<QueryInterface>;
}

/** Every migration, in order. Add new ones at the end; never edit one that has shipped. */
const MIGRATIONS: [string, Migration][] = [['0001-people-and-machines', m0001]];

export function createMigrator(sequelize: Sequelize) {
  return new Umzug({
    migrations: MIGRATIONS.map(([name, m]) => ({ name, up: m.up, down: m.down })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

/** Apply every pending migration; returns the names applied. */
export async function migrate(sequelize: Sequelize): Promise<string[]> {
  const applied = await createMigrator(sequelize).up();
  return applied.map((m) => m.name);
}
