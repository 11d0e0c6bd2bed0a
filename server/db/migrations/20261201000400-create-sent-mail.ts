import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('sent_mail', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    envelope_from: { type: DataTypes.STRING(254), allowNull: false },
    envelope_to: {
      type: DataTypes.ARRAY(DataTypes.STRING(254)),
      allowNull: false,
    },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    text_body: { type: DataTypes.TEXT, allowNull: false },
    html_body: { type: DataTypes.TEXT, allowNull: true },
    raw_size_bytes: { type: DataTypes.INTEGER, allowNull: false },
    received_at: { type: DataTypes.DATE, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('sent_mail', ['received_at']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('sent_mail');
};
