import { z } from 'zod';

/**
 * Study plans, states and the shapes the study API sends. Ranges marked
 * "common practice" are the span of radiographic equipment in ordinary use,
 * wide enough for any room and narrow enough to catch a slip of the unit.
 */

export const STUDY_STATUSES = [
  'draft',
  'submitted',
  'returned',
  'signed',
] as const;
export type StudyStatus = (typeof STUDY_STATUSES)[number];

export const ARMS = ['grid', 'no_grid'] as const;
export type Arm = (typeof ARMS)[number];

export const PHANTOM_MATERIALS = ['pmma', 'water', 'aluminium'] as const;
export type PhantomMaterial = (typeof PHANTOM_MATERIALS)[number];

export const FILTER_MATERIALS = ['Al', 'Cu'] as const;

export const AEC_CHAMBERS = [
  'centre',
  'left',
  'right',
  'left and right',
  'all three',
] as const;

const positive = (label: string, min: number, max: number, unit: string) =>
  z
    .number({ error: `Enter the ${label} as a number.` })
    .min(min, `The ${label} is at least ${min} ${unit}.`)
    .max(max, `The ${label} is at most ${max} ${unit}.`);

const distinct = <T>(values: T[]): boolean =>
  new Set(values.map((v) => JSON.stringify(v))).size === values.length;

export const filterLayerSchema = z.object({
  material: z.enum(FILTER_MATERIALS),
  // common practice: added filtration in radiography is 0–3 mm Al or Cu.
  thicknessMm: positive('filter thickness', 0.01, 10, 'mm'),
});
export type FilterLayer = z.infer<typeof filterLayerSchema>;

export const beamQualitySchema = z.object({
  // common practice: radiographic generators span 40–150 kV.
  kvp: positive('tube voltage', 40, 150, 'kV'),
  addedFiltration: z.array(filterLayerSchema).max(4).default([]),
  // common practice: measured HVLs at these voltages lie between 1 and 15 mm Al.
  hvlMmAl: positive('half-value layer', 0.5, 20, 'mm Al')
    .nullable()
    .default(null),
});
export type BeamQuality = z.infer<typeof beamQualitySchema>;

export const contrastObjectSchema = z.object({
  name: z.string().trim().min(1, 'Name the object.').max(60),
  material: z.string().trim().min(1, 'Name the material.').max(40),
  thicknessMm: positive('object thickness', 0.01, 100, 'mm'),
  diameterMm: positive('object diameter', 0.5, 300, 'mm')
    .nullable()
    .default(null),
});
export type ContrastObject = z.infer<typeof contrastObjectSchema>;

export const phantomSchema = z.object({
  material: z.enum(PHANTOM_MATERIALS),
  thicknessesCm: z
    // common practice: 5–30 cm PMMA or water spans a child to a large adult.
    .array(positive('phantom thickness', 1, 40, 'cm'))
    .min(1, 'Plan at least one phantom thickness.')
    .max(8, 'Plan at most 8 phantom thicknesses.')
    .refine(distinct, 'Each thickness once.'),
  contrastObjects: z.array(contrastObjectSchema).max(12).default([]),
});

export const geometrySchema = z.object({
  // common practice: bedside units at 50 cm up to chest stands at 400 cm.
  sidCm: positive('source-to-image distance', 50, 400, 'cm'),
  fieldWidthCm: positive('field width', 2, 50, 'cm'),
  fieldHeightCm: positive('field height', 2, 50, 'cm'),
});

export const exposurePlanSchema = z.discriminatedUnion('mode', [
  z.object({
    mode: z.literal('manual'),
    gridExposureMas: positive('grid exposure', 0.1, 1000, 'mAs'),
    noGridExposureMas: positive('no-grid exposure', 0.1, 1000, 'mAs'),
  }),
  z.object({
    mode: z.literal('aec'),
    chamber: z.enum(AEC_CHAMBERS),
  }),
]);
export type ExposurePlan = z.infer<typeof exposurePlanSchema>;

export const studyPlanSchema = z.object({
  phantom: phantomSchema,
  beamQualities: z
    .array(beamQualitySchema)
    .min(1, 'Plan at least one beam quality.')
    .max(12, 'Plan at most 12 beam qualities.')
    .refine(
      (list) => distinct(list.map((b) => [b.kvp, b.addedFiltration])),
      'Each beam quality (kV and filtration) once.',
    ),
  geometry: geometrySchema,
  exposure: exposurePlanSchema,
  replicates: z
    .number()
    .int('Replicates are a whole number.')
    .min(1, 'Plan at least one replicate.')
    .max(10, 'Plan at most 10 replicates.'),
});
export type StudyPlan = z.infer<typeof studyPlanSchema>;
export type StudyPlanInput = z.input<typeof studyPlanSchema>;

const idSchema = z.number().int().positive();

const gridIdsSchema = z
  .array(idSchema)
  .min(1, 'Choose at least one grid under test.')
  .max(4, 'Test at most 4 grids in one study.')
  .refine(distinct, 'Each grid once.');

const studyFields = {
  title: z.string().trim().min(1, 'Give the study a title.').max(120),
  purpose: z.string().trim().min(1, 'Say what the study is for.').max(2000),
  roomId: idSchema,
  gridIds: gridIdsSchema,
  plan: studyPlanSchema,
};

export const createStudySchema = z.object({
  ...studyFields,
  detectorId: idSchema.nullable().default(null),
});
export type CreateStudyInput = z.infer<typeof createStudySchema>;

/** Only the fields sent change; `detectorId: null` removes the detector. */
export const updateStudySchema = z
  .object({ ...studyFields, detectorId: idSchema.nullable() })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change.');
export type UpdateStudyInput = z.infer<typeof updateStudySchema>;

export const studyIdParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});

export const revisionParamsSchema = studyIdParamsSchema.extend({
  revision: z.coerce.number().int().positive(),
});

export const listStudiesQuerySchema = z.object({
  status: z.enum(STUDY_STATUSES).optional(),
  roomId: z.coerce.number().int().positive().optional(),
  mine: z
    .enum(['true', 'false'])
    .transform((v) => v === 'true')
    .optional(),
});
export type ListStudiesQuery = z.infer<typeof listStudiesQuerySchema>;

export const commentSchema = z.object({
  body: z.string().trim().min(1, 'Write a comment.').max(4000),
});

export const returnStudySchema = z.object({
  comment: z
    .string()
    .trim()
    .min(1, 'Say what needs changing before it comes back.')
    .max(4000),
});

export const signStudySchema = z.object({
  comment: z.string().trim().max(4000).optional(),
});

export const assignmentInputSchema = z.object({
  imageId: idSchema,
  conditionId: idSchema,
  arm: z.enum(ARMS),
  replicate: z.number().int().min(1).max(50),
  proposedBy: z.enum(['auto', 'user']),
  reason: z.string().trim().max(1000).default(''),
});
export type AssignmentInput = z.infer<typeof assignmentInputSchema>;

export const saveAssignmentsSchema = z.object({
  assignments: z
    .array(assignmentInputSchema)
    .max(2000)
    .refine(
      (list) => distinct(list.map((a) => a.imageId)),
      'Each image in one place only.',
    )
    .refine(
      (list) => distinct(list.map((a) => [a.conditionId, a.arm, a.replicate])),
      'Two images cannot fill the same replicate.',
    ),
});
export type SaveAssignmentsInput = z.infer<typeof saveAssignmentsSchema>;
