import { z } from 'zod';
import type { RegionLayout } from '../analysis/region-layout.ts';
import { regionLayoutSchema } from '../analysis/region-layout.ts';
import type { Warning } from '../warnings.ts';

/**
 * Shapes of the region-layout API: named layouts (a library reusable across
 * studies of the same phantom, and each study's own current layout), where
 * the layout sits on each image, and automatic object finding. A layout is
 * the `RegionLayout` of `lamella analyze --layout`, so a file and a saved
 * layout are interchangeable.
 */

export const layoutIdParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});

const referenceImageId = z.number().int().positive().nullable().default(null);

/** `POST /api/layouts`, `PUT /api/layouts/:id`: a library layout. */
export const saveLayoutSchema = z.object({
  layout: regionLayoutSchema,
  /** The image it was drawn on: automatic shifts are measured against it. */
  referenceImageId,
});
export type SaveLayoutInput = z.infer<typeof saveLayoutSchema>;

/**
 * `PUT /api/studies/:id/layout`: the study's layout, drawn here or copied
 * from the library.
 */
export const setStudyLayoutSchema = z.union([
  z.object({ layout: regionLayoutSchema, referenceImageId }).strict(),
  z.object({ fromLayoutId: z.number().int().positive() }).strict(),
]);
export type SetStudyLayoutInput = z.infer<typeof setStudyLayoutSchema>;

/** `POST /api/studies/:id/layout/apply`. */
export const applyLayoutSchema = z.object({
  /** Follow the phantom: shift the layout by the offset found on each image. */
  autoShift: z.boolean().default(true),
  /** Below this correlation the shift is not trusted and 0 is used; default 0.3. */
  minConfidence: z.number().min(0).max(1).default(0.3),
});
export type ApplyLayoutInput = z.infer<typeof applyLayoutSchema>;

const offsetPx = z.number().finite().min(-100_000).max(100_000);

/** `PUT /api/images/:id/regions`: this image's own offset and regions. */
export const setImageRegionsSchema = z.object({
  dxPx: offsetPx,
  dyPx: offsetPx,
  /** Region name → spec replacing that region on this image only. */
  overrides: z
    .record(z.string().min(1).max(64), z.string().min(1).max(20_000))
    .default({}),
});
export type SetImageRegionsInput = z.infer<typeof setImageRegionsSchema>;

/** `POST /api/images/:id/find-objects`. */
export const findObjectsSchema = z
  .object({
    minRadiusPx: z.number().min(1).max(2000).default(3),
    maxRadiusPx: z.number().min(2).max(5000).optional(),
    polarity: z.enum(['darker', 'brighter', 'either']).default('either'),
    maxObjects: z.number().int().min(1).max(50).default(12),
  })
  .refine((o) => o.maxRadiusPx === undefined || o.maxRadiusPx > o.minRadiusPx, {
    path: ['maxRadiusPx'],
    message: 'The largest radius must exceed the smallest.',
  });
export type FindObjectsInput = z.infer<typeof findObjectsSchema>;

/** How an image's placement came about. */
export const PLACEMENT_SOURCES = ['applied', 'auto_shift', 'manual'] as const;
export type PlacementSource = (typeof PLACEMENT_SOURCES)[number];

/** A saved layout as the API sends it. */
export interface LayoutDto extends RegionLayout {
  id: number;
  /** Null for a library layout; the study's id for a study's own layout. */
  studyId: number | null;
  referenceImageId: number | null;
  owner: { id: number; displayName: string } | null;
  createdAt: string;
  updatedAt: string;
  permissions: { edit: boolean; delete: boolean };
}

/** Where the study layout sits on one image. */
export interface PlacementDto {
  imageId: number;
  dxPx: number;
  dyPx: number;
  /** Correlation of the automatic shift, null when none was measured. */
  confidence: number | null;
  source: PlacementSource;
  overrides: Record<string, string>;
}

/** `GET /api/studies/:id/layout`. */
export interface StudyLayoutDto {
  layout: LayoutDto | null;
  placements: PlacementDto[];
  permissions: { edit: boolean };
}

/** `POST /api/studies/:id/layout/apply`. */
export interface ApplyLayoutResultDto {
  placements: PlacementDto[];
  warnings: Warning[];
}

/** `GET /api/images/:id/regions`. */
export interface ImageRegionsDto {
  imageId: number;
  studyId: number | null;
  layout: LayoutDto | null;
  placement: PlacementDto | null;
  /** The layout as it falls on this image (offset and overrides applied). */
  placed: RegionLayout | null;
  permissions: { edit: boolean };
}

/** One circular object found, in full-resolution pixels. */
export interface FoundObjectDto {
  cx: number;
  cy: number;
  radiusPx: number;
  polarity: 'darker' | 'brighter';
  contrast: number;
  cnr: number;
  circularity: number;
}

/** `POST /api/images/:id/find-objects`. */
export interface FindObjectsResultDto {
  objects: FoundObjectDto[];
  /** Proposed object circles and background rings, in pixels. */
  regions: RegionLayout['regions'];
  decimation: number;
  warnings: Warning[];
}
