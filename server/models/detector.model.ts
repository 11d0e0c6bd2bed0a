import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { DetectorType } from '../../shared/schemas/equipment.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/** An image receptor used in a room (flat panel, CR plate reader, …). */
export class Detector extends Model<
  InferAttributes<Detector>,
  InferCreationAttributes<Detector>
> {
  declare id: CreationOptional<number>;
  declare roomId: number;
  declare name: string;
  declare model: string | null;
  declare detectorType: DetectorType;
  declare pixelPitchUm: number;
  declare serial: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

Detector.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    roomId: { type: DataTypes.INTEGER, allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    model: { type: DataTypes.STRING(160), allowNull: true },
    detectorType: { type: DataTypes.STRING(40), allowNull: false },
    pixelPitchUm: { type: DataTypes.DOUBLE, allowNull: false },
    serial: { type: DataTypes.STRING(80), allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'detectors', modelName: 'Detector' },
);
