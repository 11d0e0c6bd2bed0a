import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { AnalysisSettings } from '../../shared/schemas/results.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/** A study's analysis settings and the time of the latest request for results. */
export class StudyAnalysisSettings extends Model<
  InferAttributes<StudyAnalysisSettings>,
  InferCreationAttributes<StudyAnalysisSettings>
> {
  declare studyId: number;
  declare settings: AnalysisSettings;
  declare requestedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

StudyAnalysisSettings.init(
  {
    studyId: { type: DataTypes.INTEGER, primaryKey: true },
    settings: { type: DataTypes.JSONB, allowNull: false },
    requestedAt: { type: DataTypes.DATE, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  {
    sequelize,
    tableName: 'study_analysis_settings',
    modelName: 'StudyAnalysisSettings',
  },
);
