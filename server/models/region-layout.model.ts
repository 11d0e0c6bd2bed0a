import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { RegionLayout } from '../../shared/analysis/region-layout.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * A named region layout: in the library when `studyId` is null, else the
 * study's current layout. Name, description, units and regions together are
 * a `RegionLayout`.
 */
export class RegionLayoutRecord extends Model<
  InferAttributes<RegionLayoutRecord>,
  InferCreationAttributes<RegionLayoutRecord>
> {
  declare id: CreationOptional<number>;
  declare name: string;
  /** What phantom the layout is for. */
  declare description: CreationOptional<string>;
  declare units: RegionLayout['units'];
  declare regions: RegionLayout['regions'];
  declare ownerId: number;
  declare studyId: number | null;
  /** The image the layout was drawn on; automatic shifts are measured from it. */
  declare referenceImageId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

RegionLayoutRecord.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(200), allowNull: false },
    description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
    units: { type: DataTypes.STRING(2), allowNull: false, defaultValue: 'px' },
    regions: { type: DataTypes.JSONB, allowNull: false },
    ownerId: { type: DataTypes.INTEGER, allowNull: false },
    studyId: { type: DataTypes.INTEGER, allowNull: true, unique: true },
    referenceImageId: { type: DataTypes.INTEGER, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'region_layouts', modelName: 'RegionLayoutRecord' },
);

/** The layout as the analysis and `lamella analyze` read it. */
export function toRegionLayout(record: RegionLayoutRecord): RegionLayout {
  return {
    name: record.name,
    ...(record.description ? { description: record.description } : {}),
    units: record.units,
    regions: record.regions,
  };
}
