import { createHash, randomUUID } from 'node:crypto';
import type { CreationAttributes } from 'sequelize';
import { Detector } from '../../server/models/detector.model.ts';
import { Grid } from '../../server/models/grid.model.ts';
import { Image } from '../../server/models/image.model.ts';
import { Room } from '../../server/models/room.model.ts';
import type { StudyPlanInput } from '../../shared/schemas/study.schema.ts';

const tag = () => randomUUID().slice(0, 8);

/** A room of the invented Saltmarsh General Hospital. */
export function buildRoom(name = `Room ${tag()}`): Promise<Room> {
  return Room.create({
    name,
    site: 'Saltmarsh General Hospital',
    modalityNotes: null,
  });
}

export function buildDetector(roomId: number): Promise<Detector> {
  return Detector.create({
    roomId,
    name: `Panel ${tag()}`,
    model: null,
    detectorType: 'flat_panel_indirect',
    pixelPitchUm: 139,
    serial: `DET-${tag()}`,
  });
}

/**
 * A grid with only the values a test gives: everything else not stated
 * (null), no derived fields, and a unique label unless one is given.
 */
export function buildGridWith(
  values: Partial<CreationAttributes<Grid>>,
): Promise<Grid> {
  return Grid.create({
    label: `Grid ${tag()}`,
    roomId: null,
    ratio: null,
    stripFrequencyPerCm: null,
    stripHeightUm: null,
    interspaceWidthUm: null,
    stripThicknessUm: null,
    derivedFields: [],
    stripMaterial: null,
    interspaceMaterial: null,
    coverMaterial: null,
    focusDistanceCm: null,
    focusRangeMinCm: null,
    focusRangeMaxCm: null,
    serial: null,
    statedTp: null,
    statedTs: null,
    statedContrastImprovementFactor: null,
    statedBuckyFactor: null,
    statedSelectivity: null,
    statedFiguresNote: null,
    notes: null,
    ...values,
  });
}

/** A focused grid of the given ratio (other construction values left out). */
export function buildGrid(
  ratio = 12,
  roomId: number | null = null,
): Promise<Grid> {
  return buildGridWith({
    label: `G${ratio}-${tag()}`,
    roomId,
    ratio,
    stripFrequencyPerCm: 40,
    focusDistanceCm: 115,
    focusRangeMinCm: 100,
    focusRangeMaxCm: 130,
    serial: `SN-${tag()}`,
  });
}

/** A small plan: two kV × one thickness, two replicates (8 exposures per grid). */
export const SMALL_PLAN: StudyPlanInput = {
  phantom: {
    material: 'pmma',
    thicknessesCm: [20],
    contrastObjects: [
      {
        name: 'Al disc',
        material: 'aluminium',
        thicknessMm: 1,
        diameterMm: 10,
      },
    ],
  },
  beamQualities: [
    { kvp: 70, addedFiltration: [], hvlMmAl: null },
    {
      kvp: 81,
      addedFiltration: [{ material: 'Cu', thicknessMm: 0.1 }],
      hvlMmAl: 4.2,
    },
  ],
  geometry: { sidCm: 115, fieldWidthCm: 30, fieldHeightCm: 30 },
  exposure: { mode: 'aec', chamber: 'centre' },
  replicates: 2,
};

/**
 * An image row with the header facts pairing reads, without a stored file
 * (pairing and review never open the pixels).
 */
export function buildImageRow(options: {
  uploadedBy: number;
  studyId: number | null;
  kvp?: number | null;
  exposureMas?: number | null;
  grid?: string[] | null;
  bodyPartThicknessMm?: number | null;
  acquisitionDateTime?: string | null;
  warnings?: { code: string; message: string }[];
}): Promise<Image> {
  const id = randomUUID();
  return Image.create({
    studyId: options.studyId,
    uploadedBy: options.uploadedBy,
    sha256: createHash('sha256').update(id).digest('hex'),
    sopInstanceUid: null,
    sopClassUid: null,
    studyInstanceUid: null,
    seriesInstanceUid: null,
    originalName: `IMG-${id.slice(0, 6)}.dcm`,
    storageKey: `test/${id}`,
    sizeBytes: 1024,
    rows: 64,
    columns: 64,
    frames: 1,
    transferSyntaxUid: '1.2.840.10008.1.2.1',
    photometricInterpretation: 'MONOCHROME2',
    bitsAllocated: 16,
    bitsStored: 12,
    pixelRepresentation: 0,
    samplesPerPixel: 1,
    rescaleSlope: null,
    rescaleIntercept: null,
    spacingRowMm: null,
    spacingColumnMm: null,
    spacingSource: null,
    kvp: options.kvp === undefined ? 70 : options.kvp,
    exposureMas: options.exposureMas === undefined ? 10 : options.exposureMas,
    exposureMasSource: null,
    tubeCurrentMa: null,
    exposureTimeMs: null,
    sidMm: 1150,
    sourceToPatientMm: null,
    dapDgyCm2: null,
    entranceDoseMgy: null,
    filterMaterial: null,
    filterThicknessMinMm: null,
    filterThicknessMaxMm: null,
    grid: options.grid === undefined ? null : options.grid,
    gridAbsorbingMaterial: null,
    gridSpacingMaterial: null,
    gridThicknessMm: null,
    gridPitchMm: null,
    gridAspectRatio: null,
    gridPeriodMs: null,
    gridFocalDistanceMm: null,
    gridId: null,
    exposureIndex: null,
    targetExposureIndex: null,
    deviationIndex: null,
    relativeXRayExposure: null,
    sensitivity: null,
    detectorId: null,
    detectorType: null,
    imagerPixelSpacingRowMm: null,
    imagerPixelSpacingColumnMm: null,
    pixelSpacingRowMm: null,
    pixelSpacingColumnMm: null,
    stationName: 'SGH-RAD1',
    deviceSerialNumber: null,
    manufacturer: null,
    manufacturerModelName: null,
    bodyPartThicknessMm:
      options.bodyPartThicknessMm === undefined
        ? 200
        : options.bodyPartThicknessMm,
    bodyPartExamined: null,
    viewPosition: null,
    presentationIntentType: 'FOR PROCESSING',
    pixelIntensityRelationship: null,
    pixelIntensityRelationshipSign: null,
    lossyImageCompression: null,
    lossyImageCompressionRatio: null,
    lossyImageCompressionMethod: null,
    modality: 'DX',
    acquisitionDateTime: options.acquisitionDateTime ?? null,
    header: {},
    warnings: options.warnings ?? [],
  });
}
