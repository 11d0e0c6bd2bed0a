import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('detector_calibrations', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    detector_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'detectors', key: 'id' },
      onDelete: 'RESTRICT',
    },
    calibrated_on: { type: DataTypes.DATEONLY, allowNull: false },
    beam_quality_note: { type: DataTypes.STRING(300), allowNull: false },
    points: { type: DataTypes.JSONB, allowNull: false },
    model: { type: DataTypes.STRING(20), allowNull: false },
    model_choice: { type: DataTypes.STRING(20), allowNull: false },
    parameters: { type: DataTypes.JSONB, allowNull: false },
    r_squared: { type: DataTypes.DOUBLE, allowNull: false },
    residuals: { type: DataTypes.JSONB, allowNull: false },
    residual_sd: { type: DataTypes.DOUBLE, allowNull: false },
    fits: { type: DataTypes.JSONB, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('detector_calibrations', ['detector_id', 'calibrated_on']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('detector_calibrations');
};
