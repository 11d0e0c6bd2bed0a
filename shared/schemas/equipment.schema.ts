import { z } from 'zod';
import type {
  CalibrationFit,
  CalibrationModel,
  CalibrationPoint,
  CalibrationResult,
} from '../analysis/detector-calibration.ts';
import type { ErrorDetail } from '../errors.ts';
import { MATERIAL_IDS, type MaterialId } from '../physics/attenuation.ts';
import {
  COMMON_GRID_RANGES,
  type GridConstructionInput,
  type GridQuantity,
} from '../physics/grid-construction.ts';
import type { Warning } from '../warnings.ts';

/** Kinds of image receptor the register knows. */
export const DETECTOR_TYPES = [
  'flat_panel_indirect',
  'flat_panel_direct',
  'computed_radiography',
  'other',
] as const;
/** One of {@link DETECTOR_TYPES}. */
export type DetectorType = (typeof DETECTOR_TYPES)[number];

/** Plain names of the detector types for forms and pages. */
export const DETECTOR_TYPE_LABELS: Record<DetectorType, string> = {
  flat_panel_indirect: 'Flat panel, indirect (scintillator)',
  flat_panel_direct: 'Flat panel, direct (photoconductor)',
  computed_radiography: 'Computed radiography (storage phosphor)',
  other: 'Other',
};

/** The conversion-function models a calibration can be fitted with. */
export const CALIBRATION_MODELS = [
  'linear',
  'logarithmic',
  'power',
] as const satisfies readonly CalibrationModel[];

/** The five construction quantities, in the order forms show them. */
export const GRID_QUANTITIES = [
  'ratio',
  'stripFrequencyPerCm',
  'stripHeightUm',
  'interspaceWidthUm',
  'stripThicknessUm',
] as const satisfies readonly GridQuantity[];

interface FieldLimit {
  label: string;
  unit: string;
  min: number;
  max: number;
  /** Where the bounds come from, said in every message about them. */
  basis: 'common practice range' | 'plausibility bound';
}

/**
 * Accepted ranges of grid values. Ratio, frequency and focusing distance are
 * the usual ranges of the trade (COMMON_GRID_RANGES, common practice); the
 * lengths are loose bounds that catch values typed in the wrong unit.
 */
export const GRID_FIELD_LIMITS = {
  ratio: {
    label: 'Grid ratio',
    unit: '',
    ...COMMON_GRID_RANGES.ratio,
    basis: 'common practice range',
  },
  stripFrequencyPerCm: {
    label: 'Strip frequency',
    unit: 'lines/cm',
    ...COMMON_GRID_RANGES.stripFrequencyPerCm,
    basis: 'common practice range',
  },
  stripHeightUm: {
    label: 'Strip height',
    unit: 'µm',
    min: 100,
    max: 10_000,
    basis: 'plausibility bound',
  },
  interspaceWidthUm: {
    label: 'Interspace width',
    unit: 'µm',
    min: 20,
    max: 2_000,
    basis: 'plausibility bound',
  },
  stripThicknessUm: {
    label: 'Strip thickness',
    unit: 'µm',
    min: 5,
    max: 500,
    basis: 'plausibility bound',
  },
  focusDistanceCm: {
    label: 'Focusing distance',
    unit: 'cm',
    ...COMMON_GRID_RANGES.focusDistanceCm,
    basis: 'common practice range',
  },
  focusRangeMinCm: {
    label: 'Near end of the focusing range',
    unit: 'cm',
    min: 20,
    max: 800,
    basis: 'plausibility bound',
  },
  focusRangeMaxCm: {
    label: 'Far end of the focusing range',
    unit: 'cm',
    min: 20,
    max: 800,
    basis: 'plausibility bound',
  },
} as const satisfies Record<string, FieldLimit>;

/** "Grid ratio must be between 2 and 20 (common practice range)." */
export function limitMessage(limit: FieldLimit): string {
  const unit = limit.unit ? ` ${limit.unit}` : '';
  return `${limit.label} must be between ${limit.min} and ${limit.max}${unit} (${limit.basis}).`;
}

const limitedNumber = (limit: FieldLimit) =>
  z
    .number({ error: `${limit.label} must be a number.` })
    .min(limit.min, limitMessage(limit))
    .max(limit.max, limitMessage(limit))
    .nullish();

const requiredText = (what: string, max: number) =>
  z
    .string({ error: `Enter the ${what}.` })
    .trim()
    .min(1, `Enter the ${what}.`)
    .max(max, `The ${what} has at most ${max} characters.`);

/** Optional text: an empty string is stored as null (no value). */
const optionalText = (what: string, max: number) =>
  z
    .string({ error: `The ${what} must be text.` })
    .trim()
    .max(max, `The ${what} has at most ${max} characters.`)
    .nullish()
    .transform((value) => (value === '' ? null : value))
    .optional();

const id = (what: string) =>
  z
    .number({ error: `Choose a ${what}.` })
    .int()
    .positive(`Choose a ${what}.`);

const material = (what: string) =>
  z.enum(MATERIAL_IDS, { error: `Choose a known ${what} material.` }).nullish();

const fraction = (label: string) =>
  z
    .number({ error: `${label} must be a number.` })
    .gt(0, `${label} is a transmission between 0 and 1.`)
    .max(1, `${label} is a transmission between 0 and 1.`)
    .nullish();

const factor = (label: string, min: number, max: number) =>
  z
    .number({ error: `${label} must be a number.` })
    .min(
      min,
      `${label} must be between ${min} and ${max} (plausibility bound).`,
    )
    .max(
      max,
      `${label} must be between ${min} and ${max} (plausibility bound).`,
    )
    .nullish();

const nothingToChange = (value: object) => Object.keys(value).length > 0;

/** `:id` of a room, unit, detector or grid. */
export const idParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});
/** `:id` of a detector and `:calibrationId` of one of its records. */
export const calibrationParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
  calibrationId: z.coerce.number().int().positive(),
});
/** Optional `?roomId=` filter of the unit, detector and grid lists. */
export const byRoomQuerySchema = z.object({
  roomId: z.coerce.number().int().positive().optional(),
});

/** A new room: unique name, site, optional modality notes. */
export const createRoomSchema = z.object({
  name: requiredText('room name', 120),
  site: requiredText('site', 160),
  modalityNotes: optionalText('modality notes', 2000),
});
/** A validated new room. */
export type CreateRoomInput = z.infer<typeof createRoomSchema>;
/** A change to a room: any of its fields, at least one. */
export const updateRoomSchema = createRoomSchema
  .partial()
  .refine(nothingToChange, 'Nothing to change.');
/** A validated change to a room. */
export type UpdateRoomInput = z.infer<typeof updateRoomSchema>;

/** A new X-ray unit of a room. */
export const createXrayUnitSchema = z.object({
  roomId: id('room'),
  name: requiredText('unit name', 120),
  model: optionalText('model', 160),
  serial: optionalText('serial number', 80),
});
/** A validated new X-ray unit. */
export type CreateXrayUnitInput = z.infer<typeof createXrayUnitSchema>;
/** A change to an X-ray unit, moving it included. */
export const updateXrayUnitSchema = createXrayUnitSchema
  .partial()
  .refine(nothingToChange, 'Nothing to change.');
/** A validated change to an X-ray unit. */
export type UpdateXrayUnitInput = z.infer<typeof updateXrayUnitSchema>;

/** A new detector of a room; pixel pitch in µm. */
export const createDetectorSchema = z.object({
  roomId: id('room'),
  name: requiredText('detector name', 120),
  model: optionalText('model', 160),
  detectorType: z.enum(DETECTOR_TYPES, { error: 'Choose the detector type.' }),
  pixelPitchUm: z
    .number({ error: 'Pixel pitch must be a number.' })
    .min(20, 'Pixel pitch must be between 20 and 1000 µm (plausibility bound).')
    .max(
      1000,
      'Pixel pitch must be between 20 and 1000 µm (plausibility bound).',
    ),
  serial: optionalText('serial number', 80),
});
/** A validated new detector. */
export type CreateDetectorInput = z.infer<typeof createDetectorSchema>;
/** A change to a detector, moving it included. */
export const updateDetectorSchema = createDetectorSchema
  .partial()
  .refine(nothingToChange, 'Nothing to change.');
/** A validated change to a detector. */
export type UpdateDetectorInput = z.infer<typeof updateDetectorSchema>;

const gridConstructionShape = {
  ratio: limitedNumber(GRID_FIELD_LIMITS.ratio),
  stripFrequencyPerCm: limitedNumber(GRID_FIELD_LIMITS.stripFrequencyPerCm),
  stripHeightUm: limitedNumber(GRID_FIELD_LIMITS.stripHeightUm),
  interspaceWidthUm: limitedNumber(GRID_FIELD_LIMITS.interspaceWidthUm),
  stripThicknessUm: limitedNumber(GRID_FIELD_LIMITS.stripThicknessUm),
};

/** Any subset of r, N, h, D, t to derive from, without saving. */
export const deriveGridSchema = z.object(gridConstructionShape);
/** Validated values to derive from. */
export type DeriveGridInput = z.infer<typeof deriveGridSchema>;

/**
 * A grid as entered. Construction values given here are the entered ones;
 * the server derives the rest and rejects inconsistent sets (see
 * `gridRuleProblems` in equipment-rules.ts).
 */
export const createGridSchema = z.object({
  label: requiredText('grid label', 120),
  roomId: id('room').nullish(),
  ...gridConstructionShape,
  stripMaterial: material('strip'),
  interspaceMaterial: material('interspace'),
  coverMaterial: material('cover'),
  focusDistanceCm: limitedNumber(GRID_FIELD_LIMITS.focusDistanceCm),
  focusRangeMinCm: limitedNumber(GRID_FIELD_LIMITS.focusRangeMinCm),
  focusRangeMaxCm: limitedNumber(GRID_FIELD_LIMITS.focusRangeMaxCm),
  serial: optionalText('serial number', 80),
  statedTp: fraction('Primary transmission Tp'),
  statedTs: fraction('Scatter transmission Ts'),
  statedContrastImprovementFactor: factor(
    'Contrast improvement factor K',
    0.5,
    20,
  ),
  statedBuckyFactor: factor('Bucky factor B', 1, 30),
  statedSelectivity: factor('Selectivity Σ', 0.5, 100),
  statedFiguresNote: optionalText('note on the stated figures', 300),
  notes: optionalText('notes', 2000),
});
/** A validated new grid (entered values only). */
export type CreateGridInput = z.infer<typeof createGridSchema>;
/** A change to a grid: construction values given replace the entered ones; null clears. */
export const updateGridSchema = createGridSchema
  .partial()
  .refine(nothingToChange, 'Nothing to change.');
/** A validated change to a grid. */
export type UpdateGridInput = z.infer<typeof updateGridSchema>;

const calibrationPointSchema = z.object({
  airKermaUgy: z
    .number({ error: 'Air kerma must be a number.' })
    .gt(0, 'Air kerma at the detector must be above 0 µGy.')
    .max(
      10_000,
      'Air kerma at the detector must be at most 10 000 µGy (plausibility bound).',
    ),
  meanPixelValue: z.number({ error: 'Mean pixel value must be a number.' }),
});

const calibrationPointsSchema = z
  .array(calibrationPointSchema, { error: 'Enter the flat-field points.' })
  .min(3, 'Enter at least 3 flat-field points.')
  .max(40, 'Enter at most 40 flat-field points.');

/** Points and an optional model, to preview the fits without saving. */
export const fitCalibrationSchema = z.object({
  points: calibrationPointsSchema,
  model: z
    .enum(CALIBRATION_MODELS, { error: 'Choose linear, logarithmic or power.' })
    .optional(),
});
/** Validated points (and model) to fit. */
export type FitCalibrationInput = z.infer<typeof fitCalibrationSchema>;

/** A new calibration record: date, beam quality, points, optional model. */
export const createCalibrationSchema = fitCalibrationSchema.extend({
  calibratedOn: z.iso.date('Enter the calibration date as YYYY-MM-DD.'),
  beamQualityNote: requiredText('beam quality note', 300),
  notes: optionalText('notes', 2000),
});
/** A validated new calibration record. */
export type CreateCalibrationInput = z.infer<typeof createCalibrationSchema>;

/** The result of `checkGridConstruction` (equipment-rules.ts). */
export interface GridConstructionCheck {
  /** Given and derived values. */
  values: GridConstructionInput;
  /** Quantities worked out from the given ones. */
  derivedFields: GridQuantity[];
  /** Quantities the given ones do not determine. */
  missing: GridQuantity[];
  /** Inconsistencies and derived values out of range, per field. */
  problems: ErrorDetail[];
}

/** Flags the client uses to show or hide controls. */
export interface EquipmentPermissions {
  edit: boolean;
  delete: boolean;
}

/** What the client receives about an X-ray unit. */
export interface XrayUnitDto {
  id: number;
  roomId: number;
  name: string;
  model: string | null;
  serial: string | null;
  permissions: EquipmentPermissions;
}

/** What the client receives about a detector; pixel pitch in µm. */
export interface DetectorDto {
  id: number;
  roomId: number;
  name: string;
  model: string | null;
  detectorType: DetectorType;
  pixelPitchUm: number;
  serial: string | null;
  calibrationCount: number;
  permissions: EquipmentPermissions;
}

/** What the client receives about a grid; lengths in µm, N in lines/cm, distances in cm. */
export interface GridDto extends StatedGridFigures {
  id: number;
  label: string;
  roomId: number | null;
  ratio: number | null;
  stripFrequencyPerCm: number | null;
  stripHeightUm: number | null;
  interspaceWidthUm: number | null;
  stripThicknessUm: number | null;
  /** Construction values worked out by Lamella rather than entered. */
  derivedFields: GridQuantity[];
  stripMaterial: MaterialId | null;
  interspaceMaterial: MaterialId | null;
  coverMaterial: MaterialId | null;
  focusDistanceCm: number | null;
  focusRangeMinCm: number | null;
  focusRangeMaxCm: number | null;
  serial: string | null;
  statedFiguresNote: string | null;
  notes: string | null;
  warnings: Warning[];
  updatedAt: string;
  permissions: EquipmentPermissions;
}

/** What the client receives about a room. */
export interface RoomDto {
  id: number;
  name: string;
  site: string;
  modalityNotes: string | null;
  permissions: EquipmentPermissions;
}

/** A room with what is kept in it (overview and room page). */
export interface RoomDetailDto extends RoomDto {
  units: XrayUnitDto[];
  detectors: DetectorDto[];
  grids: GridDto[];
}

/** What the client receives about a calibration record (air kerma in µGy). */
export interface DetectorCalibrationDto {
  id: number;
  detectorId: number;
  calibratedOn: string;
  beamQualityNote: string;
  points: CalibrationPoint[];
  model: CalibrationModel;
  modelChoice: CalibrationResult['choice'];
  parameters: { a: number; b: number };
  rSquared: number;
  residuals: number[];
  residualSd: number;
  fits: CalibrationFit[];
  notes: string | null;
  createdAt: string;
  /** Records are kept as made (edit is always false); delete when allowed. */
  permissions: EquipmentPermissions;
}

/** A detector with its room and calibration records, newest first. */
export interface DetectorDetailDto extends DetectorDto {
  roomName: string;
  calibrations: DetectorCalibrationDto[];
}

/** What /grids/derive answers. */
export type GridDerivationDto = GridConstructionCheck;

/** The grid fields the cross-field rules look at. */
export type GridRuleInput = Partial<
  Record<
    GridQuantity | 'focusDistanceCm' | 'focusRangeMinCm' | 'focusRangeMaxCm',
    number | null
  >
>;

/** The stated IEC 60627 figures of a grid, as entered. */
export interface StatedGridFigures {
  statedTp: number | null;
  statedTs: number | null;
  statedContrastImprovementFactor: number | null;
  statedBuckyFactor: number | null;
  statedSelectivity: number | null;
}

/** Fits for a calibration form, or the field problems that prevent them. */
export type CalibrationFitCheck =
  | { result: CalibrationResult; problems: [] }
  | { result: null; problems: ErrorDetail[] };
