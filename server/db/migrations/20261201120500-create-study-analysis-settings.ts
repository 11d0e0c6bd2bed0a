import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * A study's analysis settings (CNR definition, detrending, noise, dose
 * measure) and when its results were last asked for. A worker compares
 * `requested_at` with the request it started from, so a condition computed
 * by a run that a newer request overtook stays queued, not done.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('study_analysis_settings', {
    study_id: {
      type: DataTypes.INTEGER,
      primaryKey: true,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    settings: { type: DataTypes.JSONB, allowNull: false },
    requested_at: { type: DataTypes.DATE, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('study_analysis_settings');
};
