import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { sequelize } from '../db/sequelize.ts';

/** An X-ray generator and tube assembly installed in a room. */
export class XrayUnit extends Model<
  InferAttributes<XrayUnit>,
  InferCreationAttributes<XrayUnit>
> {
  declare id: CreationOptional<number>;
  declare roomId: number;
  declare name: string;
  declare model: string | null;
  declare serial: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

XrayUnit.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    roomId: { type: DataTypes.INTEGER, allowNull: false },
    name: { type: DataTypes.STRING(120), allowNull: false },
    model: { type: DataTypes.STRING(160), allowNull: true },
    serial: { type: DataTypes.STRING(80), allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'xray_units', modelName: 'XrayUnit' },
);
