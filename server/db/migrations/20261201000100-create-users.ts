import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('users', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    display_name: { type: DataTypes.STRING(120), allowNull: false },
    role: {
      type: DataTypes.ENUM('admin', 'physicist', 'resident', 'committee'),
      allowNull: false,
    },
    password_hash: { type: DataTypes.STRING(255), allowNull: true },
    disabled_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('users');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_users_role"');
};
