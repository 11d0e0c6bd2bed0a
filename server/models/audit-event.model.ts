import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import { sequelize } from '../db/sequelize.ts';

/** One entry of the audit trail: who did what to which thing, from where. */
export class AuditEvent extends Model<
  InferAttributes<AuditEvent>,
  InferCreationAttributes<AuditEvent>
> {
  declare id: CreationOptional<number>;
  declare actorId: number | null;
  declare action: string;
  declare targetType: string;
  declare targetId: string | null;
  declare details: Record<string, unknown>;
  declare ipAddress: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

AuditEvent.init(
  {
    id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
    actorId: { type: DataTypes.INTEGER, allowNull: true },
    action: { type: DataTypes.STRING(80), allowNull: false },
    targetType: { type: DataTypes.STRING(40), allowNull: false },
    targetId: { type: DataTypes.STRING(64), allowNull: true },
    details: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    ipAddress: { type: DataTypes.STRING(64), allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'audit_events', modelName: 'AuditEvent' },
);
