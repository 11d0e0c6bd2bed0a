import { DataTypes } from 'sequelize';
import type { Migration } from '../migrator.ts';

/** A study's comment thread; `kind` marks the comments that returned it. */
export const up: Migration['up'] = async ({ context: q }) => {
  await q.createTable('study_comments', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    study_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'studies', key: 'id' },
      onDelete: 'CASCADE',
    },
    author_id: {
      type: DataTypes.INTEGER,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'RESTRICT',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    kind: {
      type: DataTypes.ENUM('comment', 'return', 'sign'),
      allowNull: false,
      defaultValue: 'comment',
    },
    body: { type: DataTypes.TEXT, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await q.addIndex('study_comments', ['study_id', 'id']);
};

export const down: Migration['down'] = async ({ context: q }) => {
  await q.dropTable('study_comments');
  await q.sequelize.query('DROP TYPE IF EXISTS "enum_study_comments_kind"');
};
