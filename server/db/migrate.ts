import path from 'node:path';
import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import type { Logger } from '../logger';

export interface MigrationContext {
  queryInterface: QueryInterface;
  sequelize: Sequelize;
}

/** Each file in migrations/ exports `up` (and optionally `down`) taking this context. */
export interface MigrationModule {
  up(ctx: MigrationContext): Promise<void>;
  down?(ctx: MigrationContext): Promise<void>;
}

export function createMigrator(sequelize: Sequelize, log?: Logger): Umzug<MigrationContext> {
  return new Umzug<MigrationContext>({
    // every NNNN-name.ts (or compiled .js) beside this file, in name order
    migrations: {
      glob: ['migrations/[0-9][0-9][0-9][0-9]-*.{ts,js}', { cwd: __dirname, ignore: ['**/*.d.ts'] }],
      resolve: ({ name, path: file, context }) => {
        // umzug's own loader refuses .ts files; tsx and ts-jest both hook require()
        // eslint-disable-next-line @typescript-eslint/no-require-imports
        const mod = require(file as string) as MigrationModule;
        return {
          name: path.basename(name, path.extname(name)),
          up: () => mod.up(context),
          down: () => (mod.down ? mod.down(context) : Promise.resolve()),
        };
      },
    },
    context: { queryInterface: sequelize.getQueryInterface(), sequelize },
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: log
      ? { info: (m) => log.debug('migrate', m), warn: (m) => log.warn('migrate', m), error: (m) => log.error('migrate', m), debug: () => {} }
      : undefined,
  });
}

/** Apply every pending migration; returns the names applied. */
export async function migrate(sequelize: Sequelize, log?: Logger): Promise<string[]> {
  const done = await createMigrator(sequelize, log).up();
  return done.map((m) => m.name);
}
