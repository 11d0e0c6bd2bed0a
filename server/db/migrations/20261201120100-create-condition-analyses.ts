import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

// One analysis per study condition: its options, full result and verdict.
// The figures are also stored one row each in condition_figures, so the
// comparison board can aggregate them in SQL.
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('condition_analyses', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    condition_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      unique: true,
      references: { model: 'study_conditions', key: 'id' },
      onDelete: 'CASCADE',
    },
    status: {
      type: DataTypes.ENUM('queued', 'running', 'done', 'failed'),
      allowNull: false,
    },
    options: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    result: { type: DataTypes.JSONB, allowNull: true },
    verdict_outcome: {
      type: DataTypes.ENUM('benefit', 'no-measurable-benefit', 'cost'),
      allowNull: true,
    },
    verdict_sentence: { type: DataTypes.TEXT, allowNull: true },
    warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    error_code: { type: DataTypes.STRING(60), allowNull: true },
    error_message: { type: DataTypes.TEXT, allowNull: true },
    computed_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('condition_analyses', ['study_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('condition_analyses');
  await q.sequelize.query(
    'DROP TYPE IF EXISTS "enum_condition_analyses_status"; DROP TYPE IF EXISTS "enum_condition_analyses_verdict_outcome";',
  );
};
