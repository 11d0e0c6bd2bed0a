import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { sequelize } from '../db/sequelize.ts';

/** A grid under test in a study, with its place in the study's list. */
export class StudyGrid extends Model<
  InferAttributes<StudyGrid>,
  InferCreationAttributes<StudyGrid>
> {
  declare studyId: number;
  declare gridId: number;
  declare position: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

StudyGrid.init(
  {
    studyId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    gridId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
    position: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'study_grids', modelName: 'StudyGrid' },
);
