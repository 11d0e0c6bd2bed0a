import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { sequelize } from '../db/sequelize.ts';

export type TokenPurpose = 'invitation' | 'password_reset';

/** A single-use, expiring link token; only its SHA-256 is stored. */
export class AccountToken extends Model<
  InferAttributes<AccountToken>,
  InferCreationAttributes<AccountToken>
> {
  declare id: CreationOptional<number>;
  declare userId: number;
  declare purpose: TokenPurpose;
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

AccountToken.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    userId: { type: DataTypes.INTEGER, allowNull: false },
    purpose: {
      type: DataTypes.ENUM('invitation', 'password_reset'),
      allowNull: false,
    },
    tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    expiresAt: { type: DataTypes.DATE, allowNull: false },
    usedAt: { type: DataTypes.DATE, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'account_tokens', modelName: 'AccountToken' },
);
