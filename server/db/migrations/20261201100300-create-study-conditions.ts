import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * The conditions a study's plan defines: beam quality × phantom thickness ×
 * grid under test. `condition_key` keeps a condition (and the images put in
 * it) when the plan is edited without changing that combination.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('study_conditions', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    condition_key: { type: DataTypes.STRING(200), allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    kvp: { type: DataTypes.DOUBLE, allowNull: false },
    added_filtration: {
      type: DataTypes.JSONB,
      allowNull: false,
      defaultValue: [],
    },
    hvl_mm_al: { type: DataTypes.DOUBLE, allowNull: true },
    phantom_thickness_cm: { type: DataTypes.DOUBLE, allowNull: false },
    grid_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'grids', key: 'id' },
      onDelete: 'RESTRICT',
    },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('study_conditions', ['study_id', 'condition_key'], {
    unique: true,
  });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('study_conditions');
};
