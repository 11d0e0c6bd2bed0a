import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type {
  CalibrationFit,
  CalibrationModel,
  CalibrationPoint,
  CalibrationResult,
} from '../../shared/analysis/detector-calibration.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * One recorded detector calibration: the flat-field points and the fitted
 * conversion function chosen for linearisation. Records are kept as made; a
 * new calibration is a new record.
 */
export class DetectorCalibration extends Model<
  InferAttributes<DetectorCalibration>,
  InferCreationAttributes<DetectorCalibration>
> {
  declare id: CreationOptional<number>;
  declare detectorId: number;
  /** ISO date, YYYY-MM-DD. */
  declare calibratedOn: string;
  declare beamQualityNote: string;
  declare points: CalibrationPoint[];
  declare model: CalibrationModel;
  declare modelChoice: CalibrationResult['choice'];
  declare parameters: { a: number; b: number };
  declare rSquared: number;
  /** Measured − fitted pixel value, in point order. */
  declare residuals: number[];
  declare residualSd: number;
  /** Every model fitted, so the choice can be reviewed later. */
  declare fits: CalibrationFit[];
  declare notes: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

DetectorCalibration.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    detectorId: { type: DataTypes.INTEGER, allowNull: false },
    calibratedOn: { type: DataTypes.DATEONLY, allowNull: false },
    beamQualityNote: { type: DataTypes.STRING(300), allowNull: false },
    points: { type: DataTypes.JSONB, allowNull: false },
    model: { type: DataTypes.STRING(20), allowNull: false },
    modelChoice: { type: DataTypes.STRING(20), allowNull: false },
    parameters: { type: DataTypes.JSONB, allowNull: false },
    rSquared: { type: DataTypes.DOUBLE, allowNull: false },
    residuals: { type: DataTypes.JSONB, allowNull: false },
    residualSd: { type: DataTypes.DOUBLE, allowNull: false },
    fits: { type: DataTypes.JSONB, allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: true },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  {
    sequelize,
    tableName: 'detector_calibrations',
    modelName: 'DetectorCalibration',
  },
);
