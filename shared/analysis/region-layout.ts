import { z } from 'zod';
import { DomainError } from '../errors.ts';
import type { PixelSpacingMm, Region } from '../roi/region-geometry.ts';
import { parseRegionSpec, regionFromMm } from '../roi/region-geometry.ts';

/** What a named region is for. */
export const REGION_ROLES = ['object', 'background', 'beam-stop'] as const;
export type RegionRole = (typeof REGION_ROLES)[number];

const NAME = /^[A-Za-z0-9][A-Za-z0-9 _.-]{0,63}$/;

/**
 * A region layout: named regions placed once and applied to every image of a
 * study. `spec` uses the `lamella measure` syntax (circle:CX,CY,R,
 * rect:X0,Y0,W,H, ring:CX,CY,RIN,ROUT, polygon:x1,y1;…) in pixels, or in mm
 * from the top-left corner when `units` is "mm". An object is measured
 * against the background regions it names (all of them when it names none);
 * beam-stop regions lie inside the shadow of a lead disc of `diameterMm`.
 */
export const regionLayoutSchema = z
  .object({
    name: z.string().trim().min(1).max(200),
    description: z.string().max(2000).optional(),
    units: z.enum(['px', 'mm']).default('px'),
    regions: z
      .array(
        z.object({
          name: z.string().regex(NAME, 'Use letters, digits, space, _ . -'),
          role: z.enum(REGION_ROLES),
          spec: z.string().min(1).max(20_000),
          background: z.array(z.string()).optional(),
          diameterMm: z.number().positive().max(1000).optional(),
        }),
      )
      .min(2)
      .max(200),
  })
  .superRefine((layout, ctx) => {
    const names = new Set<string>();
    layout.regions.forEach((region, i) => {
      if (names.has(region.name)) {
        ctx.addIssue({
          code: 'custom',
          path: ['regions', i, 'name'],
          message: `The name '${region.name}' is used twice.`,
        });
      }
      names.add(region.name);
      if (region.role === 'beam-stop' && region.diameterMm === undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['regions', i, 'diameterMm'],
          message: 'A beam-stop region needs the lead disc diameter in mm.',
        });
      }
    });
    const backgrounds = new Set(
      layout.regions.filter((r) => r.role === 'background').map((r) => r.name),
    );
    if (!layout.regions.some((r) => r.role === 'object')) {
      ctx.addIssue({
        code: 'custom',
        path: ['regions'],
        message: 'The layout needs at least one object region.',
      });
    }
    if (backgrounds.size === 0) {
      ctx.addIssue({
        code: 'custom',
        path: ['regions'],
        message: 'The layout needs at least one background region.',
      });
    }
    layout.regions.forEach((region, i) => {
      for (const name of region.background ?? []) {
        if (!backgrounds.has(name)) {
          ctx.addIssue({
            code: 'custom',
            path: ['regions', i, 'background'],
            message: `'${name}' is not a background region of this layout.`,
          });
        }
      }
    });
  });

export type RegionLayout = z.infer<typeof regionLayoutSchema>;

/** A layout placed on one image: every region in pixels. */
export interface ResolvedLayout {
  objects: Array<{ name: string; region: Region; backgrounds: string[] }>;
  backgrounds: Array<{ name: string; region: Region }>;
  beamStops: Array<{ name: string; region: Region; diameterMm: number }>;
}

/**
 * Validates a layout given as parsed JSON.
 * @throws DomainError('validation_failed') naming the first problem's path.
 */
export function parseRegionLayout(input: unknown): RegionLayout {
  const result = regionLayoutSchema.safeParse(input);
  if (!result.success) {
    const issue = result.error.issues[0]!;
    throw new DomainError(
      'validation_failed',
      `Region layout: ${issue.path.join('.') || '(root)'}: ${issue.message}`,
    );
  }
  return result.data;
}

/**
 * Places a layout on an image: parses every spec and converts mm to pixels
 * through the image's pixel spacing.
 * @param pixelSpacing needed when the layout is in mm.
 * @throws DomainError('region_invalid') for a spec that does not parse, or a
 *   layout in mm on an image without pixel spacing.
 */
export function resolveRegionLayout(
  layout: RegionLayout,
  pixelSpacing: PixelSpacingMm | null,
): ResolvedLayout {
  const place = (spec: string, name: string): Region => {
    let region: Region;
    try {
      region = parseRegionSpec(spec);
    } catch (error) {
      if (error instanceof DomainError) {
        throw new DomainError(
          'region_invalid',
          `Region '${name}': ${error.message}`,
        );
      }
      throw error;
    }
    if (layout.units === 'px') return region;
    if (!pixelSpacing) {
      throw new DomainError(
        'region_invalid',
        'The layout is in mm but the image has no pixel spacing.',
      );
    }
    return regionFromMm(region, pixelSpacing);
  };
  const backgrounds = layout.regions
    .filter((r) => r.role === 'background')
    .map((r) => ({ name: r.name, region: place(r.spec, r.name) }));
  return {
    objects: layout.regions
      .filter((r) => r.role === 'object')
      .map((r) => ({
        name: r.name,
        region: place(r.spec, r.name),
        backgrounds:
          r.background && r.background.length > 0
            ? r.background
            : backgrounds.map((b) => b.name),
      })),
    backgrounds,
    beamStops: layout.regions
      .filter((r) => r.role === 'beam-stop')
      .map((r) => ({
        name: r.name,
        region: place(r.spec, r.name),
        diameterMm: r.diameterMm!,
      })),
  };
}
