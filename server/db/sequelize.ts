import pg from 'pg';
import { Sequelize } from 'sequelize';
import { loadConfig } from '../config/env.ts';

/** The one Sequelize instance; its URL comes from DATABASE_URL. */
export const sequelize = new Sequelize(loadConfig().databaseUrl, {
  dialect: 'postgres',
  dialectModule: pg,
  logging: false,
  define: { underscored: true, timestamps: true },
  pool: { max: 10 },
});
