import { z } from 'zod';
import type { Warning } from '../warnings.ts';

/**
 * Shapes of the image API: upload results, presented images, corrections of
 * acquisition values, preview and pixel requests, region statistics.
 */

export const imageIdParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});

/** Text fields of the multipart upload beside `files`. */
export const uploadFieldsSchema = z.object({
  studyId: z.coerce.number().int().positive().optional(),
});

export const listImagesQuerySchema = z.object({
  studyId: z.coerce.number().int().positive(),
});

export const PREVIEW_SIZES = { thumb: 256, view: 1024 } as const;
export type PreviewSize = keyof typeof PREVIEW_SIZES;

/** `?size=thumb|view&wc=&ww=`; a window needs both centre and width. */
export const previewQuerySchema = z
  .object({
    size: z.enum(['thumb', 'view']).default('view'),
    wc: z.coerce.number().finite().optional(),
    ww: z.coerce.number().finite().positive().optional(),
  })
  .refine(
    (q) => (q.wc === undefined) === (q.ww === undefined),
    'Give both wc (window centre) and ww (window width), or neither.',
  );
export type PreviewQuery = z.infer<typeof previewQuerySchema>;

export const MAX_DECIMATION = 64;

/** `?decimate=N`: every N-th row and column (1 = full resolution). */
export const pixelsQuerySchema = z.object({
  decimate: z.coerce.number().int().min(1).max(MAX_DECIMATION).default(1),
});

const coordinate = z.number().finite();
export const regionSchema = z.discriminatedUnion('shape', [
  z.object({
    shape: z.literal('circle'),
    cx: coordinate,
    cy: coordinate,
    r: coordinate,
  }),
  z.object({
    shape: z.literal('rect'),
    x0: coordinate,
    y0: coordinate,
    w: coordinate,
    h: coordinate,
  }),
  z.object({
    shape: z.literal('ring'),
    cx: coordinate,
    cy: coordinate,
    rInner: coordinate,
    rOuter: coordinate,
  }),
  z.object({
    shape: z.literal('polygon'),
    points: z
      .array(z.tuple([coordinate, coordinate]))
      .min(3)
      .max(1000),
  }),
]);

export const MAX_REGIONS_PER_REQUEST = 50;

export const regionStatsRequestSchema = z.object({
  regions: z.array(regionSchema).min(1).max(MAX_REGIONS_PER_REQUEST),
  percentiles: z.array(z.number().min(0).max(100)).max(20).optional(),
});
export type RegionStatsRequest = z.infer<typeof regionStatsRequestSchema>;

const spacingSchema = z.object({
  rowMm: z.number().positive().max(10),
  columnMm: z.number().positive().max(10),
});
export type SpacingMmDto = z.infer<typeof spacingSchema>;

const nonNegative = z.number().finite().nonnegative();
const positive = z.number().finite().positive();
const label = z.string().trim().min(1).max(64);
const labels = z.array(label).min(1).max(8);

/**
 * The acquisition values a user may correct, each with its type and unit
 * (the units of the names, as in the typed columns). A null value removes
 * an earlier correction, so the file's value applies again.
 */
export const correctableFieldSchemas = {
  kvp: positive,
  exposureMas: positive,
  tubeCurrentMa: positive,
  exposureTimeMs: positive,
  sidMm: positive,
  sourceToPatientMm: positive,
  dapDgyCm2: nonNegative,
  entranceDoseMgy: nonNegative,
  filterMaterial: labels,
  filterThicknessMinMm: z.array(nonNegative).min(1).max(8),
  filterThicknessMaxMm: z.array(nonNegative).min(1).max(8),
  grid: z
    .array(
      z.enum([
        'FIXED',
        'FOCUSED',
        'RECIPROCATING',
        'PARALLEL',
        'CROSSED',
        'NONE',
      ]),
    )
    .min(1)
    .max(3),
  gridAbsorbingMaterial: label,
  gridSpacingMaterial: label,
  gridThicknessMm: positive,
  gridPitchMm: positive,
  gridAspectRatio: z.tuple([
    z.number().int().positive(),
    z.number().int().positive(),
  ]),
  gridPeriodMs: positive,
  gridFocalDistanceMm: positive,
  gridId: label,
  exposureIndex: nonNegative,
  targetExposureIndex: positive,
  deviationIndex: z.number().finite(),
  relativeXRayExposure: nonNegative,
  sensitivity: nonNegative,
  detectorId: label,
  detectorType: label,
  imagerPixelSpacingMm: spacingSchema,
  pixelSpacingMm: spacingSchema,
  stationName: label,
  deviceSerialNumber: label,
  manufacturer: label,
  manufacturerModelName: label,
  bodyPartThicknessMm: positive,
  bodyPartExamined: label,
  viewPosition: label,
  presentationIntentType: z.enum(['FOR PROCESSING', 'FOR PRESENTATION']),
  pixelIntensityRelationship: z.enum(['LIN', 'LOG']),
  pixelIntensityRelationshipSign: z.union([z.literal(1), z.literal(-1)]),
  lossyImageCompression: z.enum(['00', '01']),
  modality: label,
  acquisitionDateTime: z.iso.datetime({ local: true, offset: true }),
} as const;

export type CorrectableField = keyof typeof correctableFieldSchemas;
export const CORRECTABLE_FIELDS = Object.keys(
  correctableFieldSchemas,
) as CorrectableField[];

/** The value type of each correctable field. */
export type CorrectionValues = {
  [K in CorrectableField]: z.infer<(typeof correctableFieldSchemas)[K]>;
};

/** `PATCH /api/images/:id/corrections`: values to set (or null to clear) and why. */
export const imageCorrectionsSchema = z.object({
  values: z
    .object(
      Object.fromEntries(
        CORRECTABLE_FIELDS.map((f) => [
          f,
          correctableFieldSchemas[f].nullable().optional(),
        ]),
      ) as {
        [K in CorrectableField]: z.ZodOptional<
          z.ZodNullable<(typeof correctableFieldSchemas)[K]>
        >;
      },
    )
    .strict()
    .refine((v) => Object.keys(v).length > 0, 'Nothing to correct.'),
  reason: z
    .string()
    .trim()
    .min(1, 'Say why the file’s value is wrong.')
    .max(1000),
});
export type ImageCorrectionsInput = z.infer<typeof imageCorrectionsSchema>;

/** One stored correction: the user's value beside the file's, and who made it. */
export interface CorrectionEntry<V = unknown> {
  value: V;
  reason: string;
  correctedBy: number;
  correctedAt: string;
}

/** What the `corrections` JSONB column holds. */
export type ImageCorrections = {
  [K in CorrectableField]?: CorrectionEntry<CorrectionValues[K]>;
};

/**
 * Acquisition values as the client sees them (file values, or corrected):
 * facts of a projection radiograph (PHYSICS.md §9), typed and in the units
 * their names carry; null when the file does not say.
 */
export interface AcquisitionDto {
  /** Peak tube voltage, kV (KVP 0018,0060). */
  kvp: number | null;
  /** Tube current–time product, mAs, from the most precise attribute present. */
  exposureMas: number | null;
  /** ExposureInuAs, Exposure, CurrentTime (from the file) or correction. */
  exposureMasSource: string | null;
  /** Tube current, mA (0018,8151 in µA preferred over 0018,1151 in mA). */
  tubeCurrentMa: number | null;
  /** Exposure time, ms (0018,8150 in µs preferred over 0018,1150 in ms). */
  exposureTimeMs: number | null;
  /** Distance Source to Detector (0018,1110), mm. */
  sidMm: number | null;
  /** Distance Source to Patient (0018,1111), mm. */
  sourceToPatientMm: number | null;
  /**
   * Image and Fluoroscopy Area Dose Product (0018,115E) in dGy·cm², the unit
   * DICOM PS3.3 defines for it (1 dGy·cm² = 0.1 Gy·cm² = 100 mGy·cm²).
   */
  dapDgyCm2: number | null;
  /** Entrance Dose in mGy (0040,8302). */
  entranceDoseMgy: number | null;
  /** Filter Material (0018,7050), one value per filter. */
  filterMaterial: string[] | null;
  /** Filter Thickness Minimum (0018,7052), mm, one value per filter. */
  filterThicknessMinMm: number[] | null;
  /** Filter Thickness Maximum (0018,7054), mm, one value per filter. */
  filterThicknessMaxMm: number[] | null;
  /** Grid (0018,1166): FIXED, FOCUSED, RECIPROCATING, PARALLEL, CROSSED, NONE. */
  grid: string[] | null;
  gridAbsorbingMaterial: string | null;
  gridSpacingMaterial: string | null;
  /** Grid Thickness (0018,7042), mm. */
  gridThicknessMm: number | null;
  /** Grid Pitch (0018,7044), mm (strip frequency = 10 / pitch lines per cm). */
  gridPitchMm: number | null;
  /** Grid Aspect Ratio (0018,7046), the integer pair as stored. */
  gridAspectRatio: [number, number] | null;
  /** Grid Period (0018,7048): reciprocation time in ms, not the pitch. */
  gridPeriodMs: number | null;
  /** Grid Focal Distance (0018,704C), mm. */
  gridFocalDistanceMm: number | null;
  /** Grid ID (0018,1006). */
  gridId: string | null;
  /** Exposure Index (0018,1411), IEC 62494-1. */
  exposureIndex: number | null;
  targetExposureIndex: number | null;
  deviationIndex: number | null;
  relativeXRayExposure: number | null;
  sensitivity: number | null;
  detectorId: string | null;
  detectorType: string | null;
  /** Imager Pixel Spacing (0018,1164): at the detector plane. */
  imagerPixelSpacingMm: SpacingMmDto | null;
  /** Pixel Spacing (0028,0030): in the patient plane when calibrated. */
  pixelSpacingMm: SpacingMmDto | null;
  stationName: string | null;
  deviceSerialNumber: string | null;
  manufacturer: string | null;
  manufacturerModelName: string | null;
  /** Body Part Thickness (0018,11A0), mm. */
  bodyPartThicknessMm: number | null;
  bodyPartExamined: string | null;
  viewPosition: string | null;
  /** FOR PROCESSING or FOR PRESENTATION (0008,0068). */
  presentationIntentType: string | null;
  /** LIN or LOG (0028,1040). */
  pixelIntensityRelationship: string | null;
  /** +1 or −1 (0028,1041). */
  pixelIntensityRelationshipSign: number | null;
  /** "00" or "01" (0028,2110). */
  lossyImageCompression: string | null;
  lossyImageCompressionRatio: number[] | null;
  lossyImageCompressionMethod: string[] | null;
  modality: string | null;
  /** ISO 8601 local date-time (no zone unless the file gives one). */
  acquisitionDateTime: string | null;
}

/** What the client receives about a stored image. */
export interface ImageDto {
  id: number;
  studyId: number | null;
  originalName: string;
  sha256: string;
  sizeBytes: number;
  sopInstanceUid: string | null;
  uploadedBy: number;
  createdAt: string;
  rows: number;
  columns: number;
  frames: number;
  transferSyntaxUid: string;
  transferSyntaxName: string;
  photometricInterpretation: string;
  bitsAllocated: number;
  bitsStored: number;
  pixelRepresentation: number;
  samplesPerPixel: number;
  rescaleSlope: number | null;
  rescaleIntercept: number | null;
  /** The spacing measurements use, from the file, and which attribute gave it. */
  pixelSpacing: (SpacingMmDto & { source: string }) | null;
  /** What the file said. */
  acquisition: AcquisitionDto;
  /** The user's corrections, keyed by field. */
  corrections: ImageCorrections;
  /** The file's values with the corrections applied: what analysis uses. */
  effectiveAcquisition: AcquisitionDto;
  /** Trust warnings found when the file was read. */
  warnings: Warning[];
  urls: { thumbnail: string; preview: string; pixels: string };
  permissions: { correct: boolean };
}

/** An image with its header (no bulk or patient data), for the detail route. */
export interface ImageDetailDto extends ImageDto {
  header: Record<string, unknown>;
}

export const UPLOAD_OUTCOMES = [
  'stored',
  'duplicate',
  'rejected',
  'skipped',
] as const;
export type UploadOutcome = (typeof UPLOAD_OUTCOMES)[number];

/**
 * The result of one uploaded file or zip member. `skipped` is for members of
 * a zip that are not images by design (DICOMDIR, hidden files).
 */
export interface UploadResultDto {
  name: string;
  outcome: UploadOutcome;
  imageId?: number;
  code?: string;
  message?: string;
  image?: ImageDto;
}

/** The body of `POST /api/images` (always HTTP 200 when the request was read). */
export interface UploadResponseDto {
  results: UploadResultDto[];
  counts: Record<UploadOutcome, number>;
}

/** The statistics of one requested region, or why it has none. */
export type RegionStatsResultDto =
  | {
      region: z.infer<typeof regionSchema>;
      stats: {
        n: number;
        mean: number;
        sampleSd: number;
        populationSd: number;
        min: number;
        max: number;
        median: number;
        percentiles: Record<string, number>;
      };
      warnings: Warning[];
    }
  | {
      region: z.infer<typeof regionSchema>;
      error: { code: string; message: string };
    };
