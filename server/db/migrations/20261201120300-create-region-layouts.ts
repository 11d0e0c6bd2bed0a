import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * Named region layouts. A layout with no study is in the library, reusable
 * for later studies of the same phantom; a layout with a study is that
 * study's current layout (at most one), copied from the library or drawn on
 * one of its images, so editing the library never changes a signed study.
 * `regions` holds the region list of the RegionLayout shape that
 * `lamella analyze --layout` reads.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('region_layouts', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(200), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    units: { type: DataTypes.STRING(2), allowNull: false, defaultValue: 'px' },
    regions: { type: DataTypes.JSONB, allowNull: false },
    owner_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      unique: true,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    reference_image_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'images', key: 'id' },
      onDelete: 'SET NULL',
    },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('region_layouts', ['name']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('region_layouts');
};
