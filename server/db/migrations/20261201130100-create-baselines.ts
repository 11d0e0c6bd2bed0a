import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * Baselines: a signed study's figures for one room + grid + beam quality +
 * phantom thickness, kept as a snapshot with a tolerance per figure, so
 * later studies of the same condition are flagged against them. One active
 * baseline per condition match; retired ones stay as history.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('baselines', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    room_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'rooms', key: 'id' },
      onDelete: 'RESTRICT',
    },
    grid_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'grids', key: 'id' },
      onDelete: 'RESTRICT',
    },
    kvp: { type: DataTypes.DOUBLE, allowNull: false },
    added_filtration: {
      type: DataTypes.JSONB,
      allowNull: false,
      defaultValue: [],
    },
    // Canonical text of added_filtration (shared/compare/tolerance.ts), so
    // matching a condition needs no JSON comparison.
    filtration_key: { type: DataTypes.STRING(200), allowNull: false },
    phantom_thickness_cm: { type: DataTypes.DOUBLE, allowNull: false },
    source_study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'studies', key: 'id' },
      onDelete: 'RESTRICT',
    },
    source_revision: { type: DataTypes.INTEGER, allowNull: false },
    // The condition and analysis may be recomputed or removed by a later
    // revision; the snapshot below is what the baseline keeps.
    source_condition_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'study_conditions', key: 'id' },
      onDelete: 'SET NULL',
    },
    source_analysis_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'condition_analyses', key: 'id' },
      onDelete: 'SET NULL',
    },
    figures: { type: DataTypes.JSONB, allowNull: false },
    tolerances: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    set_by: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    set_at: { type: DataTypes.DATE, allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    retired_at: { type: DataTypes.DATE, allowNull: true },
    retired_by: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.sequelize.query(
    `CREATE UNIQUE INDEX baselines_one_active_per_match
       ON baselines (room_id, grid_id, kvp, filtration_key, phantom_thickness_cm)
       WHERE active`,
  );
  await q.addIndex('baselines', ['source_study_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('baselines');
};
