import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { QueryInterface } from 'sequelize';
import { SequelizeStorage, Umzug } from 'umzug';
import { sequelize } from './sequelize.ts';

export type MigrationContext = QueryInterface;
export interface Migration {
  up: (args: { context: MigrationContext }) => Promise<void>;
  down: (args: { context: MigrationContext }) => Promise<void>;
}

const here = path.dirname(fileURLToPath(import.meta.url));

/**
 * Umzug over `migrations/*.{ts,js}`. Names drop the extension so a migration
 * applied under tsx is the same one after compilation to JavaScript.
 */
export const migrator = new Umzug<MigrationContext>({
  migrations: {
    glob: [
      'migrations/*.{ts,js}',
      { cwd: here, ignore: ['**/*.d.ts', '**/*.map'] },
    ],
    resolve: ({ name, path: file, context }) => {
      const load = async (): Promise<Migration> =>
        (await import(pathToFileURL(file!).href)) as Migration;
      return {
        name: name.replace(/\.(ts|js)$/, ''),
        up: async () => (await load()).up({ context }),
        down: async () => (await load()).down({ context }),
      };
    },
  },
  context: sequelize.getQueryInterface(),
  storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
  logger: undefined,
});
