import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('xray_units', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    room_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'rooms', key: 'id' },
      onDelete: 'RESTRICT',
    },
    name: { type: DataTypes.STRING(120), allowNull: false },
    model: { type: DataTypes.STRING(160), allowNull: true },
    serial: { type: DataTypes.STRING(80), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('xray_units', ['room_id', 'name'], { unique: true });
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('xray_units');
};
