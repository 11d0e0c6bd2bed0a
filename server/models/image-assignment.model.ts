import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { ARMS, type Arm } from '../../shared/schemas/study.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/** Where one image of a study sits: condition, arm and replicate number. */
export class ImageAssignment extends Model<
  InferAttributes<ImageAssignment>,
  InferCreationAttributes<ImageAssignment>
> {
  declare id: CreationOptional<number>;
  declare imageId: number;
  declare studyId: number;
  declare conditionId: number;
  declare arm: Arm;
  declare replicate: number;
  declare proposedBy: 'auto' | 'user';
  declare reason: string;
  declare assignedBy: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

ImageAssignment.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    imageId: { type: DataTypes.INTEGER, allowNull: false, unique: true },
    studyId: { type: DataTypes.INTEGER, allowNull: false },
    conditionId: { type: DataTypes.INTEGER, allowNull: false },
    arm: { type: DataTypes.ENUM(...ARMS), allowNull: false },
    replicate: { type: DataTypes.INTEGER, allowNull: false },
    proposedBy: { type: DataTypes.ENUM('auto', 'user'), allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    assignedBy: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'image_assignments', modelName: 'ImageAssignment' },
);
