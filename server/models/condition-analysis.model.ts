import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { GridVerdictOutcome } from '../../shared/analysis/verdict.ts';
import type { Warning } from '../../shared/warnings.ts';
import { sequelize } from '../db/sequelize.ts';

export type ConditionAnalysisStatus = 'queued' | 'running' | 'done' | 'failed';

/**
 * The analysis of one study condition: the options it used, the whole result
 * (figures with intervals, method, per-image summaries) and the verdict.
 */
export class ConditionAnalysis extends Model<
  InferAttributes<ConditionAnalysis>,
  InferCreationAttributes<ConditionAnalysis>
> {
  declare id: CreationOptional<number>;
  declare studyId: number;
  declare conditionId: number;
  declare status: ConditionAnalysisStatus;
  declare options: Record<string, unknown>;
  declare result: Record<string, unknown> | null;
  declare verdictOutcome: GridVerdictOutcome | null;
  declare verdictSentence: string | null;
  declare warnings: Warning[];
  declare errorCode: string | null;
  declare errorMessage: string | null;
  declare computedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

ConditionAnalysis.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    studyId: { type: DataTypes.INTEGER, allowNull: false },
    conditionId: { type: DataTypes.INTEGER, allowNull: false, unique: true },
    status: {
      type: DataTypes.ENUM('queued', 'running', 'done', 'failed'),
      allowNull: false,
    },
    options: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    result: { type: DataTypes.JSONB, allowNull: true },
    verdictOutcome: {
      type: DataTypes.ENUM('benefit', 'no-measurable-benefit', 'cost'),
      allowNull: true,
    },
    verdictSentence: { type: DataTypes.TEXT, allowNull: true },
    warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    errorCode: { type: DataTypes.STRING(60), allowNull: true },
    errorMessage: { type: DataTypes.TEXT, allowNull: true },
    computedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  {
    sequelize,
    tableName: 'condition_analyses',
    modelName: 'ConditionAnalysis',
  },
);
