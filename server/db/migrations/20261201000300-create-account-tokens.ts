import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('account_tokens', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    user_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    purpose: {
      type: DataTypes.ENUM('invitation', 'password_reset'),
      allowNull: false,
    },
    token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('account_tokens', ['user_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('account_tokens');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_account_tokens_purpose"');
};
