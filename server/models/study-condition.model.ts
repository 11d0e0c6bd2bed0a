import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { FilterLayer } from '../../shared/schemas/study.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * One condition of a study: a beam quality through a phantom thickness with
 * one grid under test; images fill its grid and no-grid arms.
 */
export class StudyCondition extends Model<
  InferAttributes<StudyCondition>,
  InferCreationAttributes<StudyCondition>
> {
  declare id: CreationOptional<number>;
  declare studyId: number;
  declare conditionKey: string;
  declare position: number;
  declare kvp: number;
  declare addedFiltration: FilterLayer[];
  declare hvlMmAl: number | null;
  declare phantomThicknessCm: number;
  declare gridId: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

StudyCondition.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    studyId: { type: DataTypes.INTEGER, allowNull: false },
    conditionKey: { type: DataTypes.STRING(200), allowNull: false },
    position: { type: DataTypes.INTEGER, allowNull: false },
    kvp: { type: DataTypes.DOUBLE, allowNull: false },
    addedFiltration: {
      type: DataTypes.JSONB,
      allowNull: false,
      defaultValue: [],
    },
    hvlMmAl: { type: DataTypes.DOUBLE, allowNull: true },
    phantomThicknessCm: { type: DataTypes.DOUBLE, allowNull: false },
    gridId: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'study_conditions', modelName: 'StudyCondition' },
);
