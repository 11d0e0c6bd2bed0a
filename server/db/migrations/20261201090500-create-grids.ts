import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

const optionalNumber = () => ({ type: DataTypes.DOUBLE, allowNull: true });

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('grids', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    label: { type: DataTypes.STRING(120), allowNull: false, unique: true },
    room_id: {
      type: DataTypes.INTEGER,
      allowNull: true,
      references: { model: 'rooms', key: 'id' },
      onDelete: 'RESTRICT',
    },
    ratio: optionalNumber(),
    strip_frequency_per_cm: optionalNumber(),
    strip_height_um: optionalNumber(),
    interspace_width_um: optionalNumber(),
    strip_thickness_um: optionalNumber(),
    // Which of the five construction values were worked out, not entered.
    derived_fields: {
      type: DataTypes.JSONB,
      allowNull: false,
      defaultValue: [],
    },
    strip_material: { type: DataTypes.STRING(40), allowNull: true },
    interspace_material: { type: DataTypes.STRING(40), allowNull: true },
    cover_material: { type: DataTypes.STRING(40), allowNull: true },
    focus_distance_cm: optionalNumber(),
    focus_range_min_cm: optionalNumber(),
    focus_range_max_cm: optionalNumber(),
    serial: { type: DataTypes.STRING(80), allowNull: true },
    stated_tp: optionalNumber(),
    stated_ts: optionalNumber(),
    stated_contrast_improvement_factor: optionalNumber(),
    stated_bucky_factor: optionalNumber(),
    stated_selectivity: optionalNumber(),
    stated_figures_note: { type: DataTypes.STRING(300), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('grids', ['room_id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('grids');
};
