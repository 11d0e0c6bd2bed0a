import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { StudySnapshot } from '../../shared/studies/study-dto.ts';
import { sequelize } from '../db/sequelize.ts';

/** The frozen copy of one signed revision of a study. */
export class StudyRevision extends Model<
  InferAttributes<StudyRevision>,
  InferCreationAttributes<StudyRevision>
> {
  declare id: CreationOptional<number>;
  declare studyId: number;
  declare revision: number;
  declare snapshot: StudySnapshot;
  declare signedBy: number;
  declare signedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

StudyRevision.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    studyId: { type: DataTypes.INTEGER, allowNull: false },
    revision: { type: DataTypes.INTEGER, allowNull: false },
    snapshot: { type: DataTypes.JSONB, allowNull: false },
    signedBy: { type: DataTypes.INTEGER, allowNull: false },
    signedAt: { type: DataTypes.DATE, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'study_revisions', modelName: 'StudyRevision' },
);
