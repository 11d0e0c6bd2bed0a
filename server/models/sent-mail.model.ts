import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { sequelize } from '../db/sequelize.ts';

/** A message as received by Lamella's local fake SMTP server. */
export class SentMail extends Model<
  InferAttributes<SentMail>,
  InferCreationAttributes<SentMail>
> {
  declare id: CreationOptional<number>;
  declare envelopeFrom: string;
  declare envelopeTo: string[];
  declare subject: string;
  declare textBody: string;
  declare htmlBody: string | null;
  declare rawSizeBytes: number;
  declare receivedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

SentMail.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    envelopeFrom: { type: DataTypes.STRING(254), allowNull: false },
    envelopeTo: {
      type: DataTypes.ARRAY(DataTypes.STRING(254)),
      allowNull: false,
    },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    textBody: { type: DataTypes.TEXT, allowNull: false },
    htmlBody: { type: DataTypes.TEXT, allowNull: true },
    rawSizeBytes: { type: DataTypes.INTEGER, allowNull: false },
    receivedAt: { type: DataTypes.DATE, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'sent_mail', modelName: 'SentMail' },
);
