import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/** The grids a study tests, in the order the study lists them. */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('study_grids', {
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      primaryKey: true,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    grid_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      primaryKey: true,
      references: { model: 'grids', key: 'id' },
      onDelete: 'RESTRICT',
    },
    position: { type: DataTypes.INTEGER, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('study_grids', ['grid_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('study_grids');
};
