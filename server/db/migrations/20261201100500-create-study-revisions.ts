import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * A frozen copy of each signed revision of a study (plan, grids, conditions,
 * assignments and later results), written when it is signed and never
 * changed, so a later revision cannot alter what was signed.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('study_revisions', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    snapshot: { type: DataTypes.JSONB, allowNull: false },
    signed_by: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    signed_at: { type: DataTypes.DATE, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('study_revisions', ['study_id', 'revision'], {
    unique: true,
  });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('study_revisions');
};
