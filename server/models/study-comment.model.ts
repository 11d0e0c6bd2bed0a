import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { sequelize } from '../db/sequelize.ts';

export const COMMENT_KINDS = ['comment', 'return', 'sign'] as const;
export type CommentKind = (typeof COMMENT_KINDS)[number];

/** One message in a study's thread; returns and sign-offs are marked. */
export class StudyComment extends Model<
  InferAttributes<StudyComment>,
  InferCreationAttributes<StudyComment>
> {
  declare id: CreationOptional<number>;
  declare studyId: number;
  declare authorId: number;
  declare revision: number;
  declare kind: CommentKind;
  declare body: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

StudyComment.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    studyId: { type: DataTypes.INTEGER, allowNull: false },
    authorId: { type: DataTypes.INTEGER, allowNull: false },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    kind: {
      type: DataTypes.ENUM(...COMMENT_KINDS),
      allowNull: false,
      defaultValue: 'comment',
    },
    body: { type: DataTypes.TEXT, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'study_comments', modelName: 'StudyComment' },
);
