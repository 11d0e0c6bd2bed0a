import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('detectors', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    room_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'rooms', key: 'id' },
      onDelete: 'RESTRICT',
    },
    name: { type: DataTypes.STRING(120), allowNull: false },
    model: { type: DataTypes.STRING(160), allowNull: true },
    detector_type: { type: DataTypes.STRING(40), allowNull: false },
    pixel_pitch_um: { type: DataTypes.DOUBLE, allowNull: false },
    serial: { type: DataTypes.STRING(80), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('detectors', ['room_id', 'name'], { unique: true });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('detectors');
};
