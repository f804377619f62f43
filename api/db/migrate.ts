import { Umzug, SequelizeStorage, type MigrationFn } from 'umzug';
import type { QueryInterface, Sequelize } from 'sequelize';
import * as m0001 from './migrations/0001-people-and-machines';
import * as m0002 from './migrations/0002-photos';
import * as m0003 from './migrations/0003-procedures-and-records';
import * as m0004 from './migrations/0004-one-draft-per-procedure';
import * as m0005 from './migrations/0005-signatures-and-audit';
import * as m0006 from './migrations/0006-archive-indexes';
import * as m0007 from './migrations/0007-outbox-and-invitations';
import * as m0008 from './migrations/0008-schedules';
import * as m0009 from './migrations/0009-blades-and-competencies';
import * as m0010 from './migrations/0010-save-step-function';
import * as m0011 from './migrations/0011-signed-run-indexes';
import * as m0020 from './migrations/0020-shared-throttles-and-mail-batches';

export interface Migration {
  up: MigrationFn<QueryInterface>;
  down: MigrationFn<QueryInterface>;
}

/** Every migration, in order. Add new ones at the end; never edit one that has shipped. */
const MIGRATIONS: [string, Migration][] = [
  ['0001-people-and-machines', m0001],
  ['0002-photos', m0002],
  ['0003-procedures-and-records', m0003],
  ['0004-one-draft-per-procedure', m0004],
  ['0005-signatures-and-audit', m0005],
  ['0006-archive-indexes', m0006],
  ['0007-outbox-and-invitations', m0007],
  ['0008-schedules', m0008],
  ['0009-blades-and-competencies', m0009],
  ['0010-save-step-function', m0010],
  ['0011-signed-run-indexes', m0011],
  ['0020-shared-throttles-and-mail-batches', m0020],
];

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
