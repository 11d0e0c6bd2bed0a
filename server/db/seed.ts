import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { SequelizeStorage, Umzug } from 'umzug';
import { sequelize } from './sequelize.ts';

const here = path.dirname(fileURLToPath(import.meta.url));

// Each demo seed runs once per database; the names applied are kept in
// `schema_seeds`, so a second start changes nothing.
const seeder = new Umzug({
  migrations: {
    glob: ['seeds/*.{ts,js}', { cwd: here, ignore: ['**/*.d.ts', '**/*.map'] }],
    resolve: ({ name, path: file }) => ({
      name: name.replace(/\.(ts|js)$/, ''),
      up: async () => {
        const seed = (await import(pathToFileURL(file!).href)) as {
          up: () => Promise<void>;
        };
        await seed.up();
      },
    }),
  },
  storage: new SequelizeStorage({ sequelize, tableName: 'schema_seeds' }),
  logger: undefined,
});

try {
  const applied = await seeder.up();
  console.log(
    applied.length
      ? `demo seeds applied: ${applied.map((s) => s.name).join(', ')}`
      : 'demo already seeded',
  );
} finally {
  await sequelize.close();
}
