import { DomainError } from '../errors.ts';

/**
 * A region of interest in pixel coordinates.
 *
 * Convention (the contract of `lamella measure`): x is the column and y the
 * row, from 0 at the top-left; pixel (x, y) covers [x, x+1) × [y, y+1), so its
 * centre is (x + 0.5, y + 0.5).
 * - circle: pixels whose centre satisfies (x+0.5−cx)² + (y+0.5−cy)² ≤ r²;
 * - rect: pixels with x0 ≤ x < x0+w and y0 ≤ y < y0+h;
 * - ring: pixels whose centre distance d satisfies rInner² < d² ≤ rOuter²;
 * - polygon: pixels whose centre is inside the closed path by the even–odd
 *   rule (a centre exactly on an edge counts when the edge is on its left).
 */
export type Region =
  | { shape: 'circle'; cx: number; cy: number; r: number }
  | { shape: 'rect'; x0: number; y0: number; w: number; h: number }
  | { shape: 'ring'; cx: number; cy: number; rInner: number; rOuter: number }
  | { shape: 'polygon'; points: Array<[number, number]> };

/** Largest coordinate magnitude accepted, in pixels (keeps work bounded). */
export const MAX_REGION_COORDINATE_PX = 1_000_000;

/** Pixel spacing of an image: rowMm between rows (y), columnMm between columns (x). */
export interface PixelSpacingMm {
  rowMm: number;
  columnMm: number;
}

const SPEC_HELP =
  "expected 'circle:CX,CY,R', 'rect:X0,Y0,W,H', 'ring:CX,CY,RIN,ROUT' or 'polygon:x1,y1;x2,y2;x3,y3…'";

function parseNumbers(text: string, spec: string): number[] {
  return text.split(',').map((part) => {
    const trimmed = part.trim();
    const value = trimmed === '' ? Number.NaN : Number(trimmed);
    if (!Number.isFinite(value)) {
      throw new DomainError(
        'region_invalid',
        `Region '${spec}' has '${part}' where a number belongs; ${SPEC_HELP}.`,
      );
    }
    return value;
  });
}

function expectCount(values: number[], count: number, spec: string): void {
  if (values.length !== count) {
    throw new DomainError(
      'region_invalid',
      `Region '${spec}' needs ${count} numbers, got ${values.length}; ${SPEC_HELP}.`,
    );
  }
}

/**
 * Checks that a region is well formed: finite coordinates within
 * ±MAX_REGION_COORDINATE_PX, positive radius and size, rInner < rOuter and at
 * least three polygon vertices.
 *
 * @throws DomainError('region_invalid') naming what is wrong.
 */
export function validateRegion(region: Region): Region {
  const fail = (why: string): never => {
    throw new DomainError('region_invalid', `Invalid ${region.shape}: ${why}.`);
  };
  const numbers =
    region.shape === 'polygon'
      ? region.points.flat()
      : region.shape === 'circle'
        ? [region.cx, region.cy, region.r]
        : region.shape === 'rect'
          ? [region.x0, region.y0, region.w, region.h]
          : [region.cx, region.cy, region.rInner, region.rOuter];
  for (const value of numbers) {
    if (!Number.isFinite(value)) fail('every coordinate must be a number');
    if (Math.abs(value) > MAX_REGION_COORDINATE_PX) {
      fail(`coordinates must lie within ±${MAX_REGION_COORDINATE_PX} pixels`);
    }
  }
  switch (region.shape) {
    case 'circle':
      if (region.r <= 0) fail('the radius must be positive');
      break;
    case 'rect':
      if (region.w <= 0 || region.h <= 0) {
        fail('width and height must be positive');
      }
      break;
    case 'ring':
      if (region.rInner < 0) fail('the inner radius must not be negative');
      if (region.rOuter <= region.rInner) {
        fail('the outer radius must exceed the inner radius');
      }
      break;
    case 'polygon':
      if (region.points.length < 3) fail('a polygon needs at least 3 points');
      break;
  }
  return region;
}

/**
 * Parses a region written on the command line or in a query string.
 *
 * @param spec `circle:CX,CY,R`, `rect:X0,Y0,W,H`, `ring:CX,CY,RIN,ROUT` or
 *   `polygon:x1,y1;x2,y2;…`, all in pixels (see {@link Region}).
 * @returns the region, validated.
 * @throws DomainError('region_invalid') when the text does not parse or the
 *   numbers make no region.
 */
export function parseRegionSpec(spec: string): Region {
  const colon = spec.indexOf(':');
  const kind = colon < 0 ? spec.trim() : spec.slice(0, colon).trim();
  const body = colon < 0 ? '' : spec.slice(colon + 1);
  switch (kind.toLowerCase()) {
    case 'circle': {
      const v = parseNumbers(body, spec);
      expectCount(v, 3, spec);
      return validateRegion({
        shape: 'circle',
        cx: v[0]!,
        cy: v[1]!,
        r: v[2]!,
      });
    }
    case 'rect': {
      const v = parseNumbers(body, spec);
      expectCount(v, 4, spec);
      return validateRegion({
        shape: 'rect',
        x0: v[0]!,
        y0: v[1]!,
        w: v[2]!,
        h: v[3]!,
      });
    }
    case 'ring': {
      const v = parseNumbers(body, spec);
      expectCount(v, 4, spec);
      return validateRegion({
        shape: 'ring',
        cx: v[0]!,
        cy: v[1]!,
        rInner: v[2]!,
        rOuter: v[3]!,
      });
    }
    case 'polygon': {
      const points = body
        .split(';')
        .filter((pair) => pair.trim() !== '')
        .map((pair): [number, number] => {
          const v = parseNumbers(pair, spec);
          expectCount(v, 2, spec);
          return [v[0]!, v[1]!];
        });
      return validateRegion({ shape: 'polygon', points });
    }
    default:
      throw new DomainError(
        'region_invalid',
        `Region '${spec}' has an unknown shape; ${SPEC_HELP}.`,
      );
  }
}

/** Writes a region back in the syntax {@link parseRegionSpec} reads. */
export function formatRegionSpec(region: Region): string {
  switch (region.shape) {
    case 'circle':
      return `circle:${region.cx},${region.cy},${region.r}`;
    case 'rect':
      return `rect:${region.x0},${region.y0},${region.w},${region.h}`;
    case 'ring':
      return `ring:${region.cx},${region.cy},${region.rInner},${region.rOuter}`;
    case 'polygon':
      return `polygon:${region.points.map(([x, y]) => `${x},${y}`).join(';')}`;
  }
}

/** Largest distance, in pixels, between an ellipse and its polygon. */
const ELLIPSE_TOLERANCE_PX = 0.01;

/** Vertices of an ellipse (semi-axes rx, ry in pixels), on the ellipse. */
function ellipsePoints(
  cx: number,
  cy: number,
  rx: number,
  ry: number,
): Array<[number, number]> {
  const rMax = Math.max(rx, ry);
  // A chord of angle 2π/N misses the curve by r(1 − cos(π/N)): choose N so
  // that sagitta stays under the tolerance.
  const n = Math.max(
    32,
    Math.ceil(
      Math.PI / Math.acos(Math.max(-1, 1 - ELLIPSE_TOLERANCE_PX / rMax)),
    ),
  );
  const points: Array<[number, number]> = [];
  for (let i = 0; i < n; i += 1) {
    const angle = (2 * Math.PI * i) / n;
    points.push([cx + rx * Math.cos(angle), cy + ry * Math.sin(angle)]);
  }
  return points;
}

/**
 * Converts a region given in millimetres (origin at the top-left corner of the
 * image, x along the rows, y down the columns) into pixel coordinates:
 * x_px = x_mm / columnMm, y_px = y_mm / rowMm.
 *
 * With square pixels every shape keeps its kind. With non-square pixels a
 * circle in millimetres is an ellipse in pixels, returned as a polygon whose
 * vertices lie on the ellipse (at most 0.01 px inside it); a ring becomes one
 * polygon path made of the outer ellipse, a zero-width bridge and the inner
 * ellipse, which the even–odd rule reads as the annulus (the bridge, walked
 * both ways, cancels). On such polygons pixels whose centre lies exactly on
 * the inner boundary count as inside the ring, unlike a pixel-space ring.
 *
 * @param region coordinates and sizes in mm.
 * @param pixelSpacing mm per pixel: rowMm between rows, columnMm between
 *   columns (DICOM Pixel Spacing / Imager Pixel Spacing order).
 * @returns the region in pixels, validated.
 * @throws DomainError('region_invalid') for a non-positive spacing or a region
 *   that is invalid after conversion.
 */
export function regionFromMm(
  region: Region,
  pixelSpacing: PixelSpacingMm,
): Region {
  const { rowMm, columnMm } = pixelSpacing;
  if (!(rowMm > 0 && columnMm > 0 && Number.isFinite(rowMm + columnMm))) {
    throw new DomainError(
      'region_invalid',
      'Pixel spacing must be positive to place a region given in mm.',
    );
  }
  const square = rowMm === columnMm;
  switch (region.shape) {
    case 'rect':
      return validateRegion({
        shape: 'rect',
        x0: region.x0 / columnMm,
        y0: region.y0 / rowMm,
        w: region.w / columnMm,
        h: region.h / rowMm,
      });
    case 'polygon':
      return validateRegion({
        shape: 'polygon',
        points: region.points.map(([x, y]) => [x / columnMm, y / rowMm]),
      });
    case 'circle':
      if (square) {
        return validateRegion({
          shape: 'circle',
          cx: region.cx / columnMm,
          cy: region.cy / rowMm,
          r: region.r / columnMm,
        });
      }
      return validateRegion({
        shape: 'polygon',
        points: ellipsePoints(
          region.cx / columnMm,
          region.cy / rowMm,
          region.r / columnMm,
          region.r / rowMm,
        ),
      });
    case 'ring': {
      const cx = region.cx / columnMm;
      const cy = region.cy / rowMm;
      if (square) {
        return validateRegion({
          shape: 'ring',
          cx,
          cy,
          rInner: region.rInner / columnMm,
          rOuter: region.rOuter / columnMm,
        });
      }
      validateRegion(region);
      const outer = ellipsePoints(
        cx,
        cy,
        region.rOuter / columnMm,
        region.rOuter / rowMm,
      );
      const points = [...outer, outer[0]!];
      if (region.rInner > 0) {
        const inner = ellipsePoints(
          cx,
          cy,
          region.rInner / columnMm,
          region.rInner / rowMm,
        );
        points.push(...inner, inner[0]!);
      }
      return validateRegion({ shape: 'polygon', points });
    }
  }
}
