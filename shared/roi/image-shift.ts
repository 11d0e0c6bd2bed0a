import type { RegionLayout } from '../analysis/region-layout.ts';
import { DomainError } from '../errors.ts';
import type { PixelSpacingMm, Region } from './region-geometry.ts';
import { formatRegionSpec, parseRegionSpec } from './region-geometry.ts';

/** Any row-major grey image: typed pixel buffer with its size. */
export interface GreyImageInput {
  pixels: ArrayLike<number>;
  columns: number;
  rows: number;
}

/** A grey image held in Float32, row-major. */
export interface GreyImage {
  pixels: Float32Array;
  columns: number;
  rows: number;
}

/**
 * Averages `factor` × `factor` blocks of the top-left `columns` × `rows`
 * part of an image whose rows are `stride` values long; blocks cut by the
 * right or bottom edge average the pixels they hold.
 * @param factor whole number ≥ 1; 1 copies the image into Float32.
 * @returns an image of ⌈columns/factor⌉ × ⌈rows/factor⌉; block (i, j)
 *   covers source pixels [i·factor, (i+1)·factor) × [j·factor, (j+1)·factor).
 * @throws DomainError('validation_failed') for a factor that is not a whole
 *   number ≥ 1 or a buffer shorter than the area.
 */
export function blockAverage(
  pixels: ArrayLike<number>,
  stride: number,
  columns: number,
  rows: number,
  factor: number,
): GreyImage {
  if (!(Number.isInteger(factor) && factor >= 1)) {
    throw new DomainError(
      'validation_failed',
      `A block size must be a whole number ≥ 1, not ${factor}.`,
    );
  }
  if (pixels.length < stride * (rows - 1) + columns || columns > stride) {
    throw new DomainError(
      'validation_failed',
      `The pixel buffer does not hold ${columns} × ${rows} pixels.`,
    );
  }
  const outColumns = Math.ceil(columns / factor);
  const outRows = Math.ceil(rows / factor);
  const sums = new Float64Array(outColumns * outRows);
  const block = new Int32Array(columns);
  for (let x = 0; x < columns; x += 1) block[x] = Math.floor(x / factor);
  for (let y = 0; y < rows; y += 1) {
    const row = Math.floor(y / factor) * outColumns;
    const base = y * stride;
    for (let x = 0; x < columns; x += 1)
      sums[row + block[x]!]! += pixels[base + x]!;
  }
  const out = new Float32Array(sums.length);
  for (let by = 0; by < outRows; by += 1) {
    const h = Math.min(factor, rows - by * factor);
    for (let bx = 0; bx < outColumns; bx += 1) {
      const w = Math.min(factor, columns - bx * factor);
      out[by * outColumns + bx] = sums[by * outColumns + bx]! / (w * h);
    }
  }
  return { pixels: out, columns: outColumns, rows: outRows };
}

function summedArea(
  values: ArrayLike<number>,
  columns: number,
  rows: number,
  include: Uint8Array | null,
): Float64Array {
  const w = columns + 1;
  const table = new Float64Array(w * (rows + 1));
  for (let y = 0; y < rows; y += 1) {
    let rowSum = 0;
    for (let x = 0; x < columns; x += 1) {
      const i = y * columns + x;
      if (!include || include[i] === 1) rowSum += values[i]!;
      table[(y + 1) * w + x + 1] = table[y * w + x + 1]! + rowSum;
    }
  }
  return table;
}

function windowSum(
  table: Float64Array,
  columns: number,
  x0: number,
  y0: number,
  x1: number,
  y1: number,
): number {
  const w = columns + 1;
  return (
    table[y1 * w + x1]! -
    table[y0 * w + x1]! -
    table[y1 * w + x0]! +
    table[y0 * w + x0]!
  );
}

/**
 * Mean over the (2·radius+1)² window around every pixel, by summed-area
 * tables in Float64; at the edges the window is cut to the image. With
 * `include`, only pixels marked 1 enter the mean; where a window holds none
 * of them the plain window mean is used.
 * @param radius window half-width in pixels (whole number ≥ 0).
 * @returns one mean per pixel, row-major.
 */
export function boxMean(
  image: GreyImage,
  radius: number,
  include: Uint8Array | null = null,
): Float32Array {
  const { columns, rows, pixels } = image;
  const r = Math.max(0, Math.round(radius));
  const plain = summedArea(pixels, columns, rows, null);
  const ones = include
    ? summedArea(
        Float32Array.from(include, (v) => (v === 1 ? 1 : 0)),
        columns,
        rows,
        null,
      )
    : null;
  const masked = include ? summedArea(pixels, columns, rows, include) : null;
  const out = new Float32Array(columns * rows);
  for (let y = 0; y < rows; y += 1) {
    const y0 = Math.max(0, y - r);
    const y1 = Math.min(rows, y + r + 1);
    for (let x = 0; x < columns; x += 1) {
      const x0 = Math.max(0, x - r);
      const x1 = Math.min(columns, x + r + 1);
      if (masked && ones) {
        const n = windowSum(ones, columns, x0, y0, x1, y1);
        if (n > 0) {
          out[y * columns + x] = windowSum(masked, columns, x0, y0, x1, y1) / n;
          continue;
        }
      }
      out[y * columns + x] =
        windowSum(plain, columns, x0, y0, x1, y1) / ((x1 - x0) * (y1 - y0));
    }
  }
  return out;
}

/**
 * The image minus its least-squares plane a + b·x + c·y over the included
 * pixels (all when `include` is null): a heel ramp would otherwise bias
 * window means where the window is cut by the image edge.
 * @param include 1 for pixels that enter the fit.
 * @returns a new image.
 */
export function withoutPlane(
  image: GreyImage,
  include: Uint8Array | null,
): GreyImage {
  const { columns, rows, pixels } = image;
  // Normal equations of v = a + b·x + c·y, coordinates centred for conditioning.
  const mx = columns / 2;
  const my = rows / 2;
  let n = 0,
    sx = 0,
    sy = 0,
    sv = 0,
    sxx = 0,
    sxy = 0,
    syy = 0,
    sxv = 0,
    syv = 0;
  for (let y = 0; y < rows; y += 1) {
    const yc = y + 0.5 - my;
    for (let x = 0; x < columns; x += 1) {
      const i = y * columns + x;
      if (include && include[i] === 0) continue;
      const xc = x + 0.5 - mx;
      const v = pixels[i]!;
      n += 1;
      sx += xc;
      sy += yc;
      sv += v;
      sxx += xc * xc;
      sxy += xc * yc;
      syy += yc * yc;
      sxv += xc * v;
      syv += yc * v;
    }
  }
  const m = [
    [n, sx, sy],
    [sx, sxx, sxy],
    [sy, sxy, syy],
  ];
  const det = (q: number[][]) =>
    q[0]![0]! * (q[1]![1]! * q[2]![2]! - q[1]![2]! * q[2]![1]!) -
    q[0]![1]! * (q[1]![0]! * q[2]![2]! - q[1]![2]! * q[2]![0]!) +
    q[0]![2]! * (q[1]![0]! * q[2]![1]! - q[1]![1]! * q[2]![0]!);
  const d = det(m);
  const rhs = [sv, sxv, syv];
  const solve = (k: number) =>
    det(m.map((row, i) => row.map((v, j) => (j === k ? rhs[i]! : v)))) / d;
  const [a, b, c] =
    d !== 0 ? [solve(0), solve(1), solve(2)] : [n > 0 ? sv / n : 0, 0, 0];
  const out = new Float32Array(pixels.length);
  for (let y = 0; y < rows; y += 1) {
    for (let x = 0; x < columns; x += 1) {
      const i = y * columns + x;
      out[i] = pixels[i]! - (a + b * (x + 0.5 - mx) + c * (y + 0.5 - my));
    }
  }
  return { pixels: out, columns, rows };
}

/** Pearson correlation of a and b moved by (dx, dy), over their overlap. */
function correlationAt(
  a: GreyImage,
  b: GreyImage,
  dx: number,
  dy: number,
): number {
  const { columns, rows } = a;
  const x0 = Math.max(0, -dx);
  const x1 = Math.min(columns, columns - dx);
  const y0 = Math.max(0, -dy);
  const y1 = Math.min(rows, rows - dy);
  const n = (x1 - x0) * (y1 - y0);
  if (x1 <= x0 || y1 <= y0) return -1;
  let sa = 0;
  let sb = 0;
  let saa = 0;
  let sbb = 0;
  let sab = 0;
  for (let y = y0; y < y1; y += 1) {
    const ia = y * columns;
    const ib = (y + dy) * columns + dx;
    for (let x = x0; x < x1; x += 1) {
      const va = a.pixels[ia + x]!;
      const vb = b.pixels[ib + x]!;
      sa += va;
      sb += vb;
      saa += va * va;
      sbb += vb * vb;
      sab += va * vb;
    }
  }
  const cov = sab - (sa * sb) / n;
  const varA = saa - (sa * sa) / n;
  const varB = sbb - (sb * sb) / n;
  return varA > 0 && varB > 0 ? cov / Math.sqrt(varA * varB) : -1;
}

/** Best integer shift in [cx ± radius] × [cy ± radius], with its correlation. */
function searchShift(
  a: GreyImage,
  b: GreyImage,
  cx: number,
  cy: number,
  radius: number,
  limitX: number,
  limitY: number,
): { dx: number; dy: number; r: number } {
  let best = { dx: cx, dy: cy, r: -Infinity };
  for (let dy = cy - radius; dy <= cy + radius; dy += 1) {
    if (Math.abs(dy) > limitY) continue;
    for (let dx = cx - radius; dx <= cx + radius; dx += 1) {
      if (Math.abs(dx) > limitX) continue;
      const r = correlationAt(a, b, dx, dy);
      if (r > best.r) best = { dx, dy, r };
    }
  }
  return best;
}

/** Vertex offset of the parabola through (−1, l), (0, c), (1, r), in (−½, ½). */
function parabolaPeak(l: number, c: number, r: number): number {
  const curvature = l - 2 * c + r;
  if (!(curvature < 0)) return 0;
  return Math.max(-0.5, Math.min(0.5, (0.5 * (l - r)) / curvature));
}

/** The shift of the phantom between two exposures. */
export interface ImageShift {
  /** Columns to add to a position in the reference to reach the moving image. */
  dxPx: number;
  /** Rows to add likewise. */
  dyPx: number;
  /**
   * Correlation (−1…1, reported clipped at 0) of the two band-passed images
   * at the shift found; near 1 when the same structures line up, near 0 when
   * nothing matches (uniform or unrelated images).
   */
  confidence: number;
}

/** Options of {@link estimateImageShift}. */
export interface ImageShiftOptions {
  /** Largest shift searched, as a fraction of the image size; default 0.25. */
  maxShiftFraction?: number;
  /** Size of the finest level searched, in pixels along the longer side; default 768. */
  baseSizePx?: number;
}

const COARSEST_SIZE_PX = 96;

function bandPass(image: GreyImage): GreyImage {
  // The phantom's objects and edges carry the position; the heel ramp, the
  // exposure and the grid's overall attenuation (low frequencies) do not,
  // and pixel noise (the highest) differs between exposures.
  const size = Math.min(image.columns, image.rows);
  const flat = withoutPlane(image, null);
  const fine = boxMean(flat, Math.max(1, Math.round(size / 100)));
  const coarse = boxMean(flat, Math.max(3, Math.round(size / 16)));
  const out = new Float32Array(image.pixels.length);
  for (let i = 0; i < out.length; i += 1) out[i] = fine[i]! - coarse[i]!;
  return { pixels: out, columns: image.columns, rows: image.rows };
}

/**
 * Estimates how far the phantom moved between two exposures of it (grid and
 * no-grid, replicates): both images are block-averaged to a base size,
 * freed of their least-squares plane (heel ramp), band-passed (a small box
 * mean minus a large one), and reduced by 2 × 2 averaging into a pyramid; the normalised
 * cross-correlation is maximised exhaustively over shifts up to
 * `maxShiftFraction` of the size on the coarsest level, refined by ±1 pixel
 * on each finer level, and given sub-pixel precision by a parabola through
 * the peak on the base level. Correlation ignores gain and offset, so a
 * grid's lower signal does not matter.
 * @param reference the image the layout was drawn on.
 * @param moving the image to place the layout on (only the common top-left
 *   area of two differently sized images is compared).
 * @returns the shift in full-resolution pixels (a point (x, y) of the
 *   reference lies at (x + dxPx, y + dyPx) in the moving image) and its
 *   confidence.
 * @throws DomainError('validation_failed') for images smaller than 16 × 16.
 * @see Lewis, "Fast normalized cross-correlation", Vision Interface 1995
 *   (correlation coefficient); Brown, "A survey of image registration
 *   techniques", ACM Computing Surveys 1992 (coarse-to-fine search).
 */
export function estimateImageShift(
  reference: GreyImageInput,
  moving: GreyImageInput,
  options: ImageShiftOptions = {},
): ImageShift {
  const columns = Math.min(reference.columns, moving.columns);
  const rows = Math.min(reference.rows, moving.rows);
  if (columns < 16 || rows < 16) {
    throw new DomainError(
      'validation_failed',
      `Images of ${columns} × ${rows} pixels are too small to find a shift.`,
    );
  }
  const fraction = options.maxShiftFraction ?? 0.25;
  const baseFactor = Math.max(
    1,
    Math.ceil(Math.max(columns, rows) / (options.baseSizePx ?? 768)),
  );
  const base = (image: GreyImageInput) =>
    bandPass(
      blockAverage(image.pixels, image.columns, columns, rows, baseFactor),
    );
  const levels: Array<[GreyImage, GreyImage]> = [
    [base(reference), base(moving)],
  ];
  for (;;) {
    const [a, b] = levels[levels.length - 1]!;
    if (Math.max(a.columns, a.rows) <= COARSEST_SIZE_PX) break;
    levels.push([
      blockAverage(a.pixels, a.columns, a.columns, a.rows, 2),
      blockAverage(b.pixels, b.columns, b.columns, b.rows, 2),
    ]);
  }
  const [topA, topB] = levels[levels.length - 1]!;
  let found = searchShift(
    topA,
    topB,
    0,
    0,
    Math.ceil(fraction * Math.max(topA.columns, topA.rows)),
    Math.floor(fraction * topA.columns),
    Math.floor(fraction * topA.rows),
  );
  for (let level = levels.length - 2; level >= 0; level -= 1) {
    const [a, b] = levels[level]!;
    found = searchShift(
      a,
      b,
      found.dx * 2,
      found.dy * 2,
      1,
      Math.floor(fraction * a.columns) + 1,
      Math.floor(fraction * a.rows) + 1,
    );
  }
  const [a, b] = levels[0]!;
  const at = (dx: number, dy: number) => correlationAt(a, b, dx, dy);
  const subX = parabolaPeak(
    at(found.dx - 1, found.dy),
    found.r,
    at(found.dx + 1, found.dy),
  );
  const subY = parabolaPeak(
    at(found.dx, found.dy - 1),
    found.r,
    at(found.dx, found.dy + 1),
  );
  return {
    dxPx: (found.dx + subX) * baseFactor,
    dyPx: (found.dy + subY) * baseFactor,
    confidence: Math.max(0, found.r),
  };
}

const round3 = (v: number): number => Math.round(v * 1000) / 1000;

/**
 * Moves a region by (dx, dy) in its own units.
 * @returns a new region of the same shape and size.
 */
export function translateRegion(
  region: Region,
  dx: number,
  dy: number,
): Region {
  switch (region.shape) {
    case 'circle':
    case 'ring':
      return {
        ...region,
        cx: round3(region.cx + dx),
        cy: round3(region.cy + dy),
      };
    case 'rect':
      return {
        ...region,
        x0: round3(region.x0 + dx),
        y0: round3(region.y0 + dy),
      };
    case 'polygon':
      return {
        shape: 'polygon',
        points: region.points.map(([x, y]) => [round3(x + dx), round3(y + dy)]),
      };
  }
}

/** Where a study's layout sits on one image. */
export interface ImagePlacement {
  /** Offset of the phantom from the reference image, pixels. */
  dxPx: number;
  dyPx: number;
  /** Region name → spec (layout units) that replaces the shifted region on this image only. */
  overrides: Record<string, string>;
}

/**
 * The layout as it falls on one image: every region moved by the image's
 * offset (converted to mm through the pixel spacing for a layout in mm),
 * then the image's own overrides put in place of the regions they name.
 * Names, roles and order are kept, so every image of a condition yields the
 * same objects.
 * @throws DomainError('region_invalid') for an override naming no region,
 *   a spec that does not parse, or an offset on a layout in mm when the
 *   image has no pixel spacing.
 */
export function placeLayout(
  layout: RegionLayout,
  placement: ImagePlacement,
  pixelSpacing: PixelSpacingMm | null,
): RegionLayout {
  const names = new Set(layout.regions.map((r) => r.name));
  for (const name of Object.keys(placement.overrides)) {
    if (!names.has(name)) {
      throw new DomainError(
        'region_invalid',
        `The image's own region '${name}' is not in the layout '${layout.name}'.`,
      );
    }
  }
  let dx = placement.dxPx;
  let dy = placement.dyPx;
  if (layout.units === 'mm' && (dx !== 0 || dy !== 0)) {
    if (!pixelSpacing) {
      throw new DomainError(
        'region_invalid',
        'The layout is in mm but the image has no pixel spacing, so its offset cannot be applied.',
      );
    }
    dx *= pixelSpacing.columnMm;
    dy *= pixelSpacing.rowMm;
  }
  return {
    ...layout,
    regions: layout.regions.map((r) => {
      const override = placement.overrides[r.name];
      if (override !== undefined) {
        parseSpec(override, r.name);
        return { ...r, spec: override };
      }
      if (dx === 0 && dy === 0) return r;
      return {
        ...r,
        spec: formatRegionSpec(
          translateRegion(parseSpec(r.spec, r.name), dx, dy),
        ),
      };
    }),
  };
}

function parseSpec(spec: string, name: string): Region {
  try {
    return parseRegionSpec(spec);
  } catch (error) {
    if (error instanceof DomainError) {
      throw new DomainError(
        'region_invalid',
        `Region '${name}': ${error.message}`,
      );
    }
    throw error;
  }
}
