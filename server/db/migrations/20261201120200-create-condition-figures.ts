import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('condition_figures', {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    analysis_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'condition_analyses', key: 'id' },
      onDelete: 'CASCADE',
    },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    condition_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'study_conditions', key: 'id' },
      onDelete: 'CASCADE',
    },
    figure: { type: DataTypes.STRING(60), allowNull: false },
    value: { type: DataTypes.DOUBLE, allowNull: false },
    standard_error: { type: DataTypes.DOUBLE, allowNull: false },
    ci_low: { type: DataTypes.DOUBLE, allowNull: false },
    ci_high: { type: DataTypes.DOUBLE, allowNull: false },
    degrees_of_freedom: { type: DataTypes.DOUBLE, allowNull: true },
    n: { type: DataTypes.INTEGER, allowNull: false },
    basis: { type: DataTypes.STRING(20), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('condition_figures', ['analysis_id', 'figure'], {
    unique: true,
  });
  await q.addIndex('condition_figures', ['figure', 'study_id']);
  await q.addIndex('condition_figures', ['condition_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('condition_figures');
};
