import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { Role } from '../../shared/permissions.ts';
import { ROLES } from '../../shared/permissions.ts';
import { sequelize } from '../db/sequelize.ts';

export class User extends Model<
  InferAttributes<User>,
  InferCreationAttributes<User>
> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare displayName: string;
  declare role: Role;
  declare passwordHash: string | null;
  declare disabledAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

User.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    displayName: { type: DataTypes.STRING(120), allowNull: false },
    role: { type: DataTypes.ENUM(...ROLES), allowNull: false },
    passwordHash: { type: DataTypes.STRING(255), allowNull: true },
    disabledAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'users', modelName: 'User' },
);
