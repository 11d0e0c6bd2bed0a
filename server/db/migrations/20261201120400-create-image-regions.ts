import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * Where a study's layout sits on each of its images: the offset of the
 * phantom from the layout's reference image (found automatically or set by
 * hand) and the regions this image has of its own (name → spec), which
 * replace the shifted ones on this image only.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('image_regions', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    image_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      unique: true,
      references: { model: 'images', key: 'id' },
      onDelete: 'CASCADE',
    },
    layout_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'region_layouts', key: 'id' },
      onDelete: 'CASCADE',
    },
    dx_px: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    dy_px: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    shift_confidence: { type: DataTypes.DOUBLE, allowNull: true },
    source: {
      type: DataTypes.ENUM('applied', 'auto_shift', 'manual'),
      allowNull: false,
    },
    overrides: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    updated_by: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('image_regions', ['layout_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('image_regions');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_image_regions_source"');
};
