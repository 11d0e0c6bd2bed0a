import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { FigureKey } from '../../shared/figures.ts';
import type { BaselineFigureDto } from '../../shared/schemas/compare.schema.ts';
import type { FilterLayer } from '../../shared/schemas/study.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * A signed study's figures kept as the reference of one room + grid + beam
 * quality + phantom thickness, with a tolerance (%) per figure. Only one
 * baseline per match is active; retired ones stay as history.
 */
export class Baseline extends Model<
  InferAttributes<Baseline>,
  InferCreationAttributes<Baseline>
> {
  declare id: CreationOptional<number>;
  declare roomId: number;
  declare gridId: number;
  declare kvp: number;
  declare addedFiltration: FilterLayer[];
  declare filtrationKey: string;
  declare phantomThicknessCm: number;
  declare sourceStudyId: number;
  declare sourceRevision: number;
  declare sourceConditionId: number | null;
  declare sourceAnalysisId: number | null;
  declare figures: Partial<Record<FigureKey, BaselineFigureDto>>;
  declare tolerances: Partial<Record<FigureKey, number>>;
  declare note: string;
  declare setBy: number;
  declare setAt: Date;
  declare active: CreationOptional<boolean>;
  declare retiredAt: CreationOptional<Date | null>;
  declare retiredBy: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

Baseline.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    roomId: { type: DataTypes.INTEGER, allowNull: false },
    gridId: { type: DataTypes.INTEGER, allowNull: false },
    kvp: { type: DataTypes.DOUBLE, allowNull: false },
    addedFiltration: {
      type: DataTypes.JSONB,
      allowNull: false,
      defaultValue: [],
    },
    filtrationKey: { type: DataTypes.STRING(200), allowNull: false },
    phantomThicknessCm: { type: DataTypes.DOUBLE, allowNull: false },
    sourceStudyId: { type: DataTypes.INTEGER, allowNull: false },
    sourceRevision: { type: DataTypes.INTEGER, allowNull: false },
    sourceConditionId: { type: DataTypes.INTEGER, allowNull: true },
    sourceAnalysisId: { type: DataTypes.INTEGER, allowNull: true },
    figures: { type: DataTypes.JSONB, allowNull: false },
    tolerances: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    setBy: { type: DataTypes.INTEGER, allowNull: false },
    setAt: { type: DataTypes.DATE, allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    retiredAt: { type: DataTypes.DATE, allowNull: true },
    retiredBy: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'baselines', modelName: 'Baseline' },
);
