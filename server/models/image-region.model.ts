import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import {
  PLACEMENT_SOURCES,
  type PlacementSource,
} from '../../shared/schemas/layout.schema.ts';
import { sequelize } from '../db/sequelize.ts';

/** Where a study's layout sits on one image: offset and own regions. */
export class ImageRegion extends Model<
  InferAttributes<ImageRegion>,
  InferCreationAttributes<ImageRegion>
> {
  declare id: CreationOptional<number>;
  declare imageId: number;
  declare layoutId: number;
  /** Offset of the phantom from the layout's reference image, pixels. */
  declare dxPx: number;
  declare dyPx: number;
  declare shiftConfidence: number | null;
  declare source: PlacementSource;
  /** Region name → spec used on this image instead of the shifted region. */
  declare overrides: Record<string, string>;
  declare updatedBy: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

ImageRegion.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    imageId: { type: DataTypes.INTEGER, allowNull: false, unique: true },
    layoutId: { type: DataTypes.INTEGER, allowNull: false },
    dxPx: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    dyPx: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
    shiftConfidence: { type: DataTypes.DOUBLE, allowNull: true },
    source: { type: DataTypes.ENUM(...PLACEMENT_SOURCES), allowNull: false },
    overrides: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    updatedBy: { type: DataTypes.INTEGER, allowNull: false },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'image_regions', modelName: 'ImageRegion' },
);
