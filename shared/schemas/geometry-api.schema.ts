import { z } from 'zod';
import { MATERIAL_IDS } from '../physics/attenuation.ts';
import type {
  GeometryPlan,
  GeometryPlanInput,
} from '../physics/focused-grid.ts';
import type { GridConstruction } from '../physics/grid-construction.ts';
import type { GridPrediction } from '../physics/predicted-transmission.ts';
import {
  geometryPlanSchema,
  predictedTransmissionSchema,
} from './geometry.schema.ts';

/**
 * Requests and answers of the `/api/geometry` routes: the focused-grid
 * planner and predicted transmissions, with a grid typed in or taken from
 * the register (`gridId`). Lengths in cm unless the name says µm or mm.
 */

const gridIdSchema = z.number().int().positive();

/**
 * Spectra uploaded as text are capped so one request cannot tie up the
 * server; 200 kB holds several thousand `energy,fluence` lines.
 */
export const MAX_SPECTRUM_CSV_CHARS = 200_000;

/**
 * Total filtration assumed when a request gives none: 2.5 mm Al, the usual
 * minimum total filtration of a radiographic tube (from memory of IEC
 * 60601-1-3).
 */
export const DEFAULT_TOTAL_FILTRATION_MM_AL = 2.5;

/** The "from memory" note printed beside the default filtration. */
export const DEFAULT_FILTRATION_SOURCE =
  'usual minimum total filtration, from memory of IEC 60601-1-3';

const planShape = geometryPlanSchema.shape;

/**
 * `POST /api/geometry/plan`: the planner's input, with the grid either
 * typed (ratio and focusing distance) or named by `gridId` (both from the
 * register), not both.
 */
export const planRequestSchema = geometryPlanSchema
  .extend({
    gridId: gridIdSchema.optional(),
    ratio: planShape.ratio.optional(),
    focusDistanceCm: planShape.focusDistanceCm.optional(),
  })
  .superRefine((request, ctx) => {
    const typed = (['ratio', 'focusDistanceCm'] as const).filter(
      (key) => request[key] !== undefined,
    );
    if (request.gridId !== undefined && typed.length > 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['gridId'],
        message:
          'Choose a grid from the register or type its ratio and focusing distance, not both.',
      });
    }
    if (request.gridId === undefined) {
      if (request.ratio === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['ratio'],
          message: 'Enter the grid ratio or choose a grid from the register.',
        });
      }
      if (request.focusDistanceCm === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['focusDistanceCm'],
          message:
            'Enter the focusing distance or choose a grid from the register.',
        });
      }
    }
  });
export type PlanRequest = z.infer<typeof planRequestSchema>;
export type PlanRequestInput = z.input<typeof planRequestSchema>;

const transmissionShape = predictedTransmissionSchema.shape;
const weightingSchema = z.enum(['photons', 'energy']).default('energy');

/** The beam of a predicted-transmission request. */
export const beamRequestSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('energy'),
    energyKeV: z
      .number()
      .min(1, 'Energies start at 1 keV.')
      .max(200, 'Energies end at 200 keV.'),
  }),
  z.object({
    kind: z.literal('kramers'),
    // common practice: radiographic generators span 40–150 kV; 20 kV admits mammography.
    kvp: z
      .number()
      .min(20, 'The tube voltage is at least 20 kV.')
      .max(150, 'The tube voltage is at most 150 kV.'),
    totalFiltrationMmAl: z
      .number()
      .min(0, 'Filtration cannot be negative.')
      .max(20, 'Filtration is at most 20 mm Al.')
      .default(DEFAULT_TOTAL_FILTRATION_MM_AL),
    weighting: weightingSchema,
  }),
  z.object({
    kind: z.literal('spectrum'),
    spectrumCsv: z
      .string()
      .min(1, 'Paste or choose a spectrum file.')
      .max(MAX_SPECTRUM_CSV_CHARS, 'The spectrum file is too long.'),
    fileName: z.string().max(200).optional(),
    weighting: weightingSchema,
  }),
]);
export type BeamRequest = z.infer<typeof beamRequestSchema>;

/**
 * `POST /api/geometry/transmission`: a construction typed in (any three of
 * r, N, h, D, t, and the interspace material) or a register grid
 * (`gridId`, construction and materials from the register), a beam and the
 * assumed SPR. Cover plates are always given here, since the register holds
 * no plate thicknesses.
 */
export const transmissionRequestSchema = z
  .object({
    gridId: gridIdSchema.optional(),
    construction: transmissionShape.construction.optional(),
    stripMaterial: z.enum(MATERIAL_IDS).optional(),
    stripDensityGPerCm3: transmissionShape.stripDensityGPerCm3,
    interspaceMaterial: z.enum(MATERIAL_IDS).optional(),
    interspaceDensityGPerCm3: transmissionShape.interspaceDensityGPerCm3,
    coverPlates: transmissionShape.coverPlates,
    beam: beamRequestSchema,
    scatterToPrimaryRatio: z
      .number({ error: 'Enter the assumed scatter-to-primary ratio.' })
      .finite()
      .min(0, 'The scatter-to-primary ratio cannot be negative.')
      .max(50, 'The scatter-to-primary ratio is at most 50.'),
    maxScatterAngleDeg: transmissionShape.maxScatterAngleDeg,
  })
  .superRefine((request, ctx) => {
    if (request.gridId !== undefined) {
      for (const key of [
        'construction',
        'stripMaterial',
        'interspaceMaterial',
      ] as const) {
        if (request[key] !== undefined) {
          ctx.addIssue({
            code: 'custom',
            path: [key],
            message:
              'A register grid brings its own construction and materials; leave this out or type the whole grid.',
          });
        }
      }
      return;
    }
    if (request.construction === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['construction'],
        message: 'Enter the construction or choose a grid from the register.',
      });
    }
    if (request.interspaceMaterial === undefined) {
      ctx.addIssue({
        code: 'custom',
        path: ['interspaceMaterial'],
        message: 'Choose the interspace material.',
      });
    }
  });
export type TransmissionRequest = z.infer<typeof transmissionRequestSchema>;
export type TransmissionRequestInput = z.input<
  typeof transmissionRequestSchema
>;

/** `GET /api/geometry/grids/:id/prediction` query. */
export const gridPredictionQuerySchema = z.object({
  kvp: z.coerce
    .number({ error: 'Give the tube voltage in kV.' })
    .min(20, 'The tube voltage is at least 20 kV.')
    .max(150, 'The tube voltage is at most 150 kV.'),
  /** Total filtration, mm Al; when left out 2.5 mm is assumed and said so. */
  filtrationMmAl: z.coerce
    .number()
    .min(0, 'Filtration cannot be negative.')
    .max(20, 'Filtration is at most 20 mm Al.')
    .optional(),
  spr: z.coerce
    .number({ error: 'Give the assumed scatter-to-primary ratio.' })
    .min(0, 'The scatter-to-primary ratio cannot be negative.')
    .max(50, 'The scatter-to-primary ratio is at most 50.'),
});
export type GridPredictionQuery = z.infer<typeof gridPredictionQuerySchema>;

/** `GET /api/geometry/studies/:id/predictions` query. */
export const studyPredictionsQuerySchema = gridPredictionQuerySchema.pick({
  spr: true,
});

/** A register grid named in an answer. */
export interface GeometryGridRefDto {
  id: number;
  label: string;
}

/** What the planner sends back. */
export interface GeometryPlanDto extends GeometryPlan {
  /** The input the plan was made from, with register values filled in. */
  input: GeometryPlanInput;
  /** The register grid the ratio and focusing distance came from. */
  grid: GeometryGridRefDto | null;
}

/** The beam a prediction was made for, in words and numbers. */
export interface PredictedBeamDto {
  /** e.g. "80 kV, 2.5 mm Al total filtration, Kramers (1923) …". */
  description: string;
  /** Spectrum model or file, null for a single energy. */
  spectrumModel: string | null;
  binCount: number;
}

/** Predicted transmissions and figures, with everything they assume. */
export interface PredictedFiguresDto extends GridPrediction {
  grid: GeometryGridRefDto | null;
  construction: GridConstruction;
  beam: PredictedBeamDto;
  /** Cover plates included, by material name; empty when none were. */
  coverPlates: { material: string; thicknessUm: number }[];
}

/** The prediction for one condition of a study, or why there is none. */
export interface ConditionPredictionDto {
  conditionId: number;
  conditionLabel: string;
  gridId: number;
  prediction: PredictedFiguresDto | null;
  /** Why no prediction could be made (e.g. construction not in the register). */
  unavailableReason: string | null;
}

/** `GET /api/geometry/studies/:id/predictions` answer. */
export interface StudyPredictionsDto {
  /** The SPR assumed for every condition. */
  scatterToPrimaryRatio: number;
  conditions: ConditionPredictionDto[];
}
