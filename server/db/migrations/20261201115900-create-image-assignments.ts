import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/**
 * Which condition, arm and replicate each image of a study fills. It refers
 * to images, so it runs after the images table (hence its late timestamp);
 * an image fills at most one place and a place holds at most one image.
 */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('image_assignments', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    image_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      unique: true,
      references: { model: 'images', key: 'id' },
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
    arm: { type: DataTypes.ENUM('grid', 'no_grid'), allowNull: false },
    replicate: { type: DataTypes.INTEGER, allowNull: false },
    proposed_by: { type: DataTypes.ENUM('auto', 'user'), allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    assigned_by: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('image_assignments', ['condition_id', 'arm', 'replicate'], {
    unique: true,
  });
  await q.addIndex('image_assignments', ['study_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('image_assignments');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_image_assignments_arm"');
  await q.sequelize.query(
    'DROP TYPE IF EXISTS "enum_image_assignments_proposed_by"',
  );
};
