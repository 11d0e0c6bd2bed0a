import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('audit_events', {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    actor_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'SET NULL',
    },
    action: { type: DataTypes.STRING(80), allowNull: false },
    target_type: { type: DataTypes.STRING(40), allowNull: false },
    target_id: { type: DataTypes.STRING(64), allowNull: true },
    details: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    ip_address: { type: DataTypes.STRING(64), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('audit_events', ['target_type', 'target_id']);
  await q.addIndex('audit_events', ['created_at']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('audit_events');
};
