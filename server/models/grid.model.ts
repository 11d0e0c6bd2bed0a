import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type { GridQuantity } from '../../shared/physics/grid-construction.ts';
import type { MaterialId } from '../../shared/physics/attenuation.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * An anti-scatter grid of the inventory. Construction values are in µm and
 * lines/cm; `derivedFields` names those worked out from the others.
 */
export class Grid extends Model<
  InferAttributes<Grid>,
  InferCreationAttributes<Grid>
> {
  declare id: CreationOptional<number>;
  declare label: string;
  declare roomId: number | null;
  declare ratio: number | null;
  declare stripFrequencyPerCm: number | null;
  declare stripHeightUm: number | null;
  declare interspaceWidthUm: number | null;
  declare stripThicknessUm: number | null;
  declare derivedFields: GridQuantity[];
  declare stripMaterial: MaterialId | null;
  declare interspaceMaterial: MaterialId | null;
  declare coverMaterial: MaterialId | null;
  declare focusDistanceCm: number | null;
  declare focusRangeMinCm: number | null;
  declare focusRangeMaxCm: number | null;
  declare serial: string | null;
  declare statedTp: number | null;
  declare statedTs: number | null;
  declare statedContrastImprovementFactor: number | null;
  declare statedBuckyFactor: number | null;
  declare statedSelectivity: number | null;
  declare statedFiguresNote: string | null;
  declare notes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

// Functions, not shared objects: Sequelize writes each attribute's column
// name into its definition, so one object reused would map every attribute
// to the same column.
const optionalNumber = () => ({ type: DataTypes.DOUBLE, allowNull: true });
const optionalMaterial = () => ({
  type: DataTypes.STRING(40),
  allowNull: true,
});

Grid.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    label: { type: DataTypes.STRING(120), allowNull: false, unique: true },
    roomId: { type: DataTypes.INTEGER, allowNull: true },
    ratio: optionalNumber(),
    stripFrequencyPerCm: optionalNumber(),
    stripHeightUm: optionalNumber(),
    interspaceWidthUm: optionalNumber(),
    stripThicknessUm: optionalNumber(),
    derivedFields: {
      type: DataTypes.JSONB,
      allowNull: false,
      defaultValue: [],
    },
    stripMaterial: optionalMaterial(),
    interspaceMaterial: optionalMaterial(),
    coverMaterial: optionalMaterial(),
    focusDistanceCm: optionalNumber(),
    focusRangeMinCm: optionalNumber(),
    focusRangeMaxCm: optionalNumber(),
    serial: { type: DataTypes.STRING(80), allowNull: true },
    statedTp: optionalNumber(),
    statedTs: optionalNumber(),
    statedContrastImprovementFactor: optionalNumber(),
    statedBuckyFactor: optionalNumber(),
    statedSelectivity: optionalNumber(),
    statedFiguresNote: { type: DataTypes.STRING(300), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'grids', modelName: 'Grid' },
);
