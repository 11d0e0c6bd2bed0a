import type { Migration } from '../migrator.ts';

// The table layout connect-pg-simple expects (its table.sql).
export const up: Migration['up'] = async ({ context: q }) => {
  await q.sequelize.query(`
    CREATE TABLE "session" (
      "sid" varchar NOT NULL COLLATE "default" PRIMARY KEY,
      "sess" json NOT NULL,
      "expire" timestamp(6) NOT NULL
    );
    CREATE INDEX "IDX_session_expire" ON "session" ("expire");
  `);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('session');
};
