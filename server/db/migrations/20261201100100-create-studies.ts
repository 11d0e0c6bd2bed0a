import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * A grid study of one room: its plan (JSONB, validated by the study plan
 * schema), its review state and who signed which revision.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('studies', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    room_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'rooms', key: 'id' },
      onDelete: 'RESTRICT',
    },
    detector_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'detectors', key: 'id' },
      onDelete: 'RESTRICT',
    },
    title: { type: DataTypes.STRING(120), allowNull: false },
    purpose: { type: DataTypes.TEXT, allowNull: false },
    status: {
      type: DataTypes.ENUM('draft', 'submitted', 'returned', 'signed'),
      allowNull: false,
      defaultValue: 'draft',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    plan: { type: DataTypes.JSONB, allowNull: false },
    created_by: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    signed_by: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    signed_at: { type: DataTypes.DATE, allowNull: true },
    submitted_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('studies', ['status']);
  await q.addIndex('studies', ['room_id']);
  await q.addIndex('studies', ['created_by']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('studies');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_studies_status"');
};
