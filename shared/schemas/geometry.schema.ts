import { z } from 'zod';
import { MATERIAL_IDS } from '../physics/attenuation.ts';
import { TABLE_RANGE_KEV } from '../physics/attenuation-data.ts';

/**
 * Input of the focused-grid geometry planner and of predicted transmissions,
 * for the API route and the planner page. Lengths in cm unless the name says
 * µm; angles in degrees. Checks here are only what a form can catch; the
 * physics functions check the rest (e.g. inconsistent construction).
 */

const positive = (label: string) =>
  z.number().finite().positive(`${label} must be positive.`);

/** Planner input; passes straight to `planFocusedGrid`. */
export const geometryPlanSchema = z.object({
  ratio: positive('Grid ratio'),
  focusDistanceCm: positive('Focusing distance'),
  sourceGridDistanceCm: positive('Focus–grid distance'),
  lateralOffsetCm: z.number().finite().default(0),
  tiltDeg: z.number().finite().min(-45).max(45).default(0),
  isUpsideDown: z.boolean().default(false),
  fieldWidthCm: positive('Field width'),
  focusingCriterion: z
    .number()
    .gt(0, 'The criterion is a fraction above 0.')
    .lt(1, 'The criterion is a fraction below 1.')
    .default(0.6),
  profilePointCount: z.number().int().min(2).max(1001).default(41),
});
export type GeometryPlanRequest = z.infer<typeof geometryPlanSchema>;

const materialSchema = z.enum(MATERIAL_IDS);
const densitySchema = positive('Density').optional();
const energySchema = z
  .number()
  .min(TABLE_RANGE_KEV.min, `Energies start at ${TABLE_RANGE_KEV.min} keV.`)
  .max(TABLE_RANGE_KEV.max, `Energies end at ${TABLE_RANGE_KEV.max} keV.`);

/** Any subset of the construction quantities (see `deriveGridConstruction`). */
export const gridConstructionSchema = z.object({
  ratio: positive('Grid ratio').optional(),
  stripFrequencyPerCm: positive('Strip frequency').optional(),
  stripHeightUm: positive('Strip height').optional(),
  interspaceWidthUm: positive('Interspace width').optional(),
  stripThicknessUm: positive('Strip thickness').optional(),
});

/** Predicted-transmission input; the construction is completed first. */
export const predictedTransmissionSchema = z.object({
  construction: gridConstructionSchema,
  stripMaterial: materialSchema.default('lead'),
  stripDensityGPerCm3: densitySchema,
  interspaceMaterial: materialSchema,
  interspaceDensityGPerCm3: densitySchema,
  coverPlates: z
    .array(
      z.object({
        material: materialSchema,
        thicknessUm: z.number().finite().nonnegative(),
        densityGPerCm3: densitySchema,
      }),
    )
    .max(4)
    .default([]),
  beam: z.union([
    z.object({ energyKeV: energySchema }),
    z.object({
      spectrum: z
        .array(
          z.object({
            energyKeV: energySchema,
            fluence: z.number().finite().nonnegative(),
          }),
        )
        .min(1, 'The spectrum needs at least one bin.')
        .max(2000),
      weighting: z.enum(['photons', 'energy']).default('energy'),
    }),
  ]),
  scatterToPrimaryRatio: z.number().finite().nonnegative(),
  maxScatterAngleDeg: z.number().gt(0).max(90).default(90),
});
export type PredictedTransmissionRequest = z.infer<
  typeof predictedTransmissionSchema
>;
