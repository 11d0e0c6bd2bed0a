import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { UncertaintyBasis } from '../../shared/analysis/estimate.ts';
import type { FigureKey } from '../../shared/figures.ts';
import { sequelize } from '../db/sequelize.ts';
import { ConditionAnalysis } from './condition-analysis.model.ts';

/** One figure of one condition analysis, with its 95 % interval. */
export class ConditionFigure extends Model<
  InferAttributes<ConditionFigure>,
  InferCreationAttributes<ConditionFigure>
> {
  declare id: CreationOptional<number>;
  declare analysisId: number;
  declare studyId: number;
  declare conditionId: number;
  declare figure: FigureKey;
  declare value: number;
  declare standardError: number;
  declare ciLow: number;
  declare ciHigh: number;
  declare degreesOfFreedom: number | null;
  declare n: number;
  declare basis: UncertaintyBasis;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

ConditionFigure.init(
  {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    analysisId: { type: DataTypes.INTEGER, allowNull: false },
    studyId: { type: DataTypes.INTEGER, allowNull: false },
    conditionId: { type: DataTypes.INTEGER, allowNull: false },
    figure: { type: DataTypes.STRING(60), allowNull: false },
    value: { type: DataTypes.DOUBLE, allowNull: false },
    standardError: { type: DataTypes.DOUBLE, allowNull: false },
    ciLow: { type: DataTypes.DOUBLE, allowNull: false },
    ciHigh: { type: DataTypes.DOUBLE, allowNull: false },
    degreesOfFreedom: { type: DataTypes.DOUBLE, allowNull: true },
    n: { type: DataTypes.INTEGER, allowNull: false },
    basis: { type: DataTypes.STRING(20), allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'condition_figures', modelName: 'ConditionFigure' },
);

ConditionAnalysis.hasMany(ConditionFigure, {
  foreignKey: 'analysisId',
  as: 'figures',
});
ConditionFigure.belongsTo(ConditionAnalysis, {
  foreignKey: 'analysisId',
  as: 'analysis',
});
