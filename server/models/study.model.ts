import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import {
  STUDY_STATUSES,
  type StudyPlan,
  type StudyStatus,
} from '../../shared/schemas/study.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * A grid study of one room. `plan` holds the parsed study plan; the
 * conditions it defines live in `study_conditions`, the grids under test in
 * `study_grids`.
 */
export class Study extends Model<
  InferAttributes<Study>,
  InferCreationAttributes<Study>
> {
  declare id: CreationOptional<number>;
  declare roomId: number;
  declare detectorId: number | null;
  declare title: string;
  declare purpose: string;
  declare status: CreationOptional<StudyStatus>;
  declare revision: CreationOptional<number>;
  declare plan: StudyPlan;
  declare createdBy: number;
  declare signedBy: CreationOptional<number | null>;
  declare signedAt: CreationOptional<Date | null>;
  declare submittedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

Study.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    roomId: { type: DataTypes.INTEGER, allowNull: false },
    detectorId: { type: DataTypes.INTEGER, allowNull: true },
    title: { type: DataTypes.STRING(120), allowNull: false },
    purpose: { type: DataTypes.TEXT, allowNull: false },
    status: {
      type: DataTypes.ENUM(...STUDY_STATUSES),
      allowNull: false,
      defaultValue: 'draft',
    },
    revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    plan: { type: DataTypes.JSONB, allowNull: false },
    createdBy: { type: DataTypes.INTEGER, allowNull: false },
    signedBy: { type: DataTypes.INTEGER, allowNull: true },
    signedAt: { type: DataTypes.DATE, allowNull: true },
    submittedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'studies', modelName: 'Study' },
);
