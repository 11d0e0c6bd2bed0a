import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
} from 'sequelize';
import type {
  AcquisitionDto,
  CorrectableField,
  ImageCorrections,
  SpacingMmDto,
} from '../../shared/schemas/image.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { sequelize } from '../db/sequelize.ts';

/**
 * One stored DICOM file. Acquisition columns hold what the file said; the
 * user's corrections live in `corrections` beside them, never over them.
 */
export class Image extends Model<
  InferAttributes<Image>,
  InferCreationAttributes<Image>
> {
  declare id: CreationOptional<number>;
  declare studyId: number | null;
  declare uploadedBy: number;
  declare sha256: string;
  declare sopInstanceUid: string | null;
  declare sopClassUid: string | null;
  declare studyInstanceUid: string | null;
  declare seriesInstanceUid: string | null;
  declare originalName: string;
  declare storageKey: string;
  declare sizeBytes: number;

  declare rows: number;
  declare columns: number;
  declare frames: number;
  declare transferSyntaxUid: string;
  declare photometricInterpretation: string;
  declare bitsAllocated: number;
  declare bitsStored: number;
  declare pixelRepresentation: number;
  declare samplesPerPixel: number;
  declare rescaleSlope: number | null;
  declare rescaleIntercept: number | null;
  declare spacingRowMm: number | null;
  declare spacingColumnMm: number | null;
  declare spacingSource: string | null;

  declare kvp: number | null;
  declare exposureMas: number | null;
  declare exposureMasSource: string | null;
  declare tubeCurrentMa: number | null;
  declare exposureTimeMs: number | null;
  declare sidMm: number | null;
  declare sourceToPatientMm: number | null;
  declare dapDgyCm2: number | null;
  declare entranceDoseMgy: number | null;
  declare filterMaterial: string[] | null;
  declare filterThicknessMinMm: number[] | null;
  declare filterThicknessMaxMm: number[] | null;
  declare grid: string[] | null;
  declare gridAbsorbingMaterial: string | null;
  declare gridSpacingMaterial: string | null;
  declare gridThicknessMm: number | null;
  declare gridPitchMm: number | null;
  declare gridAspectRatio: number[] | null;
  declare gridPeriodMs: number | null;
  declare gridFocalDistanceMm: number | null;
  declare gridId: string | null;
  declare exposureIndex: number | null;
  declare targetExposureIndex: number | null;
  declare deviationIndex: number | null;
  declare relativeXRayExposure: number | null;
  declare sensitivity: number | null;
  declare detectorId: string | null;
  declare detectorType: string | null;
  declare imagerPixelSpacingRowMm: number | null;
  declare imagerPixelSpacingColumnMm: number | null;
  declare pixelSpacingRowMm: number | null;
  declare pixelSpacingColumnMm: number | null;
  declare stationName: string | null;
  declare deviceSerialNumber: string | null;
  declare manufacturer: string | null;
  declare manufacturerModelName: string | null;
  declare bodyPartThicknessMm: number | null;
  declare bodyPartExamined: string | null;
  declare viewPosition: string | null;
  declare presentationIntentType: string | null;
  declare pixelIntensityRelationship: string | null;
  declare pixelIntensityRelationshipSign: number | null;
  declare lossyImageCompression: string | null;
  declare lossyImageCompressionRatio: number[] | null;
  declare lossyImageCompressionMethod: string[] | null;
  declare modality: string | null;
  declare acquisitionDateTime: string | null;

  declare header: Record<string, unknown>;
  declare warnings: Warning[];
  declare corrections: CreationOptional<ImageCorrections>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

// Functions, not shared objects: Model.init writes each attribute's column
// name into its definition, so one object reused for two attributes would
// map both to the same column.
const real = () => ({ type: DataTypes.DOUBLE, allowNull: true });
const text = () => ({ type: DataTypes.TEXT, allowNull: true });
const realArray = () => ({
  type: DataTypes.ARRAY(DataTypes.DOUBLE),
  allowNull: true,
});
const textArray = () => ({
  type: DataTypes.ARRAY(DataTypes.TEXT),
  allowNull: true,
});
const required = <T>(type: T) => ({ type, allowNull: false });

Image.init(
  {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    studyId: { type: DataTypes.INTEGER, allowNull: true },
    uploadedBy: { type: DataTypes.INTEGER, allowNull: false },
    sha256: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    sopInstanceUid: text(),
    sopClassUid: text(),
    studyInstanceUid: text(),
    seriesInstanceUid: text(),
    originalName: required(DataTypes.TEXT),
    storageKey: required(DataTypes.TEXT),
    // BIGINT comes back from pg as a string; sizes stay far below 2^53.
    sizeBytes: {
      ...required(DataTypes.BIGINT),
      get(this: Image) {
        return Number(this.getDataValue('sizeBytes'));
      },
    },

    rows: required(DataTypes.INTEGER),
    columns: required(DataTypes.INTEGER),
    frames: required(DataTypes.INTEGER),
    transferSyntaxUid: required(DataTypes.TEXT),
    photometricInterpretation: required(DataTypes.TEXT),
    bitsAllocated: required(DataTypes.SMALLINT),
    bitsStored: required(DataTypes.SMALLINT),
    pixelRepresentation: required(DataTypes.SMALLINT),
    samplesPerPixel: required(DataTypes.SMALLINT),
    rescaleSlope: real(),
    rescaleIntercept: real(),
    spacingRowMm: real(),
    spacingColumnMm: real(),
    spacingSource: text(),

    kvp: real(),
    exposureMas: real(),
    exposureMasSource: text(),
    tubeCurrentMa: real(),
    exposureTimeMs: real(),
    sidMm: real(),
    sourceToPatientMm: real(),
    dapDgyCm2: real(),
    entranceDoseMgy: real(),
    filterMaterial: textArray(),
    filterThicknessMinMm: realArray(),
    filterThicknessMaxMm: realArray(),
    grid: textArray(),
    gridAbsorbingMaterial: text(),
    gridSpacingMaterial: text(),
    gridThicknessMm: real(),
    gridPitchMm: real(),
    gridAspectRatio: realArray(),
    gridPeriodMs: real(),
    gridFocalDistanceMm: real(),
    gridId: text(),
    exposureIndex: real(),
    targetExposureIndex: real(),
    deviationIndex: real(),
    relativeXRayExposure: real(),
    sensitivity: real(),
    detectorId: text(),
    detectorType: text(),
    imagerPixelSpacingRowMm: real(),
    imagerPixelSpacingColumnMm: real(),
    pixelSpacingRowMm: real(),
    pixelSpacingColumnMm: real(),
    stationName: text(),
    deviceSerialNumber: text(),
    manufacturer: text(),
    manufacturerModelName: text(),
    bodyPartThicknessMm: real(),
    bodyPartExamined: text(),
    viewPosition: text(),
    presentationIntentType: text(),
    pixelIntensityRelationship: text(),
    pixelIntensityRelationshipSign: real(),
    lossyImageCompression: text(),
    lossyImageCompressionRatio: realArray(),
    lossyImageCompressionMethod: textArray(),
    modality: text(),
    acquisitionDateTime: text(),

    header: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    warnings: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
    corrections: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
    createdAt: DataTypes.DATE,
    updatedAt: DataTypes.DATE,
  },
  { sequelize, tableName: 'images', modelName: 'Image' },
);

const spacing = (
  rowMm: number | null,
  columnMm: number | null,
): SpacingMmDto | null =>
  rowMm !== null && columnMm !== null ? { rowMm, columnMm } : null;

/** The acquisition values exactly as the file gave them. */
export function fileAcquisition(image: Image): AcquisitionDto {
  const pair = image.gridAspectRatio;
  return {
    kvp: image.kvp,
    exposureMas: image.exposureMas,
    exposureMasSource: image.exposureMasSource,
    tubeCurrentMa: image.tubeCurrentMa,
    exposureTimeMs: image.exposureTimeMs,
    sidMm: image.sidMm,
    sourceToPatientMm: image.sourceToPatientMm,
    dapDgyCm2: image.dapDgyCm2,
    entranceDoseMgy: image.entranceDoseMgy,
    filterMaterial: image.filterMaterial,
    filterThicknessMinMm: image.filterThicknessMinMm,
    filterThicknessMaxMm: image.filterThicknessMaxMm,
    grid: image.grid,
    gridAbsorbingMaterial: image.gridAbsorbingMaterial,
    gridSpacingMaterial: image.gridSpacingMaterial,
    gridThicknessMm: image.gridThicknessMm,
    gridPitchMm: image.gridPitchMm,
    gridAspectRatio: pair && pair.length === 2 ? [pair[0]!, pair[1]!] : null,
    gridPeriodMs: image.gridPeriodMs,
    gridFocalDistanceMm: image.gridFocalDistanceMm,
    gridId: image.gridId,
    exposureIndex: image.exposureIndex,
    targetExposureIndex: image.targetExposureIndex,
    deviationIndex: image.deviationIndex,
    relativeXRayExposure: image.relativeXRayExposure,
    sensitivity: image.sensitivity,
    detectorId: image.detectorId,
    detectorType: image.detectorType,
    imagerPixelSpacingMm: spacing(
      image.imagerPixelSpacingRowMm,
      image.imagerPixelSpacingColumnMm,
    ),
    pixelSpacingMm: spacing(
      image.pixelSpacingRowMm,
      image.pixelSpacingColumnMm,
    ),
    stationName: image.stationName,
    deviceSerialNumber: image.deviceSerialNumber,
    manufacturer: image.manufacturer,
    manufacturerModelName: image.manufacturerModelName,
    bodyPartThicknessMm: image.bodyPartThicknessMm,
    bodyPartExamined: image.bodyPartExamined,
    viewPosition: image.viewPosition,
    presentationIntentType: image.presentationIntentType,
    pixelIntensityRelationship: image.pixelIntensityRelationship,
    pixelIntensityRelationshipSign: image.pixelIntensityRelationshipSign,
    lossyImageCompression: image.lossyImageCompression,
    lossyImageCompressionRatio: image.lossyImageCompressionRatio,
    lossyImageCompressionMethod: image.lossyImageCompressionMethod,
    modality: image.modality,
    acquisitionDateTime: image.acquisitionDateTime,
  };
}

/** The file's values with the user's corrections laid over them. */
export function effectiveAcquisition(image: Image): AcquisitionDto {
  const effective: Record<string, unknown> = { ...fileAcquisition(image) };
  for (const [field, entry] of Object.entries(image.corrections)) {
    if (entry) effective[field as CorrectableField] = entry.value;
  }
  if (image.corrections.exposureMas) effective.exposureMasSource = 'correction';
  return effective as unknown as AcquisitionDto;
}
