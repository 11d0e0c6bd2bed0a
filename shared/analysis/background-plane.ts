import { DomainError } from '../errors.ts';
import type { RegionSpans } from '../roi/region-mask.ts';
import type {
  PixelArray,
  SignalLookupTable,
} from '../roi/region-statistics.ts';

/**
 * Least-squares plane z = a + b·x + c·y through the signal of one or more
 * background regions, with x, y at pixel centres (x + 0.5, y + 0.5) in image
 * pixels. Used to remove a slow trend (heel effect, field non-uniformity)
 * from the background before its noise is taken.
 */
export interface BackgroundPlane {
  /** Signal at pixel-centre coordinate (0, 0), in signal units. */
  intercept: number;
  /** Change of signal per pixel along x (columns). */
  slopeXPerPx: number;
  /** Change of signal per pixel along y (rows). */
  slopeYPerPx: number;
  /** Pixels in the fit. */
  n: number;
  /** Mean signal over the fitted pixels. */
  mean: number;
  /** SD about the plane, divisor n − 3 (three fitted parameters). */
  sampleSdAboutPlane: number;
  /** Plain sample SD over the same pixels (divisor n − 1), for comparison. */
  plainSampleSd: number;
  /** Centroid of the fitted pixel centres, in pixels. */
  centroidXPx: number;
  centroidYPx: number;
  /** Sums of squares and products of the pixel coordinates about the centroid. */
  sumSquaresXPx2: number;
  sumProductsXYPx2: number;
  sumSquaresYPx2: number;
}

/**
 * Standard error of the plane's signal at (x, y): with residual SD s,
 * SE² = s²·(1/n + dᵀ M⁻¹ d), d the offset from the centroid and M the
 * coordinate sums of squares (regression prediction variance).
 * @see Draper & Smith, Applied Regression Analysis (3rd ed.), §5.3.
 */
export function planeStandardErrorAt(
  plane: BackgroundPlane,
  xPx: number,
  yPx: number,
): number {
  const dx = xPx - plane.centroidXPx;
  const dy = yPx - plane.centroidYPx;
  const sxx = plane.sumSquaresXPx2;
  const sxy = plane.sumProductsXYPx2;
  const syy = plane.sumSquaresYPx2;
  const det = sxx * syy - sxy * sxy;
  const leverage = (syy * dx * dx - 2 * sxy * dx * dy + sxx * dy * dy) / det;
  return plane.sampleSdAboutPlane * Math.sqrt(1 / plane.n + leverage);
}

/**
 * Centroid of a region's pixel centres, in pixels (for evaluating a
 * background plane at an object).
 * @throws DomainError('region_empty') for an empty region.
 */
export function spansCentroid(spans: RegionSpans): {
  xPx: number;
  yPx: number;
} {
  let n = 0;
  let sx = 0;
  let sy = 0;
  const s = spans.spans;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const len = s[k + 2]! - s[k + 1]!;
    n += len;
    sx += (len * (s[k + 1]! + s[k + 2]!)) / 2;
    sy += len * (s[k]! + 0.5);
  }
  if (n === 0) {
    throw new DomainError('region_empty', 'The region holds no pixel.');
  }
  return { xPx: sx / n, yPx: sy / n };
}

/** Signal of the plane at pixel-centre coordinates (x, y). */
export function planeSignalAt(
  plane: BackgroundPlane,
  xPx: number,
  yPx: number,
): number {
  return plane.intercept + plane.slopeXPerPx * xPx + plane.slopeYPerPx * yPx;
}

interface Moments {
  n: number;
  sx: number;
  sy: number;
  sxx: number;
  sxy: number;
  syy: number;
  sz: number;
  sxz: number;
  syz: number;
  szz: number;
}

function accumulate(
  pixels: PixelArray,
  columns: number,
  regions: readonly RegionSpans[],
  lut: SignalLookupTable | undefined,
  shift: number,
): Moments {
  const m: Moments = {
    n: 0,
    sx: 0,
    sy: 0,
    sxx: 0,
    sxy: 0,
    syy: 0,
    sz: 0,
    sxz: 0,
    syz: 0,
    szz: 0,
  };
  for (const region of regions) {
    const s = region.spans;
    for (let k = 0; k < region.count * 3; k += 3) {
      const y = s[k]!;
      const x0 = s[k + 1]!;
      const x1 = s[k + 2]!;
      const base = y * columns;
      // Per-row sums are short, so they stay (nearly) exact before they are
      // added to the image totals; x and y here are integer pixel indices.
      let rz = 0;
      let rxz = 0;
      let rzz = 0;
      if (lut) {
        const table = lut.table;
        const offset = lut.offset;
        for (let x = x0; x < x1; x += 1) {
          const z = table[pixels[base + x]! + offset]! - shift;
          rz += z;
          rxz += x * z;
          rzz += z * z;
        }
      } else {
        // Four interleaved accumulator sets: the sums of one set depend on
        // each other, so a single set would wait on every addition.
        let z1s = 0;
        let z2s = 0;
        let z3s = 0;
        let xz1 = 0;
        let xz2 = 0;
        let xz3 = 0;
        let zz1 = 0;
        let zz2 = 0;
        let zz3 = 0;
        let x = x0;
        for (; x + 3 < x1; x += 4) {
          const i = base + x;
          const z0 = pixels[i]! - shift;
          const z1 = pixels[i + 1]! - shift;
          const z2 = pixels[i + 2]! - shift;
          const z3 = pixels[i + 3]! - shift;
          rz += z0;
          z1s += z1;
          z2s += z2;
          z3s += z3;
          rxz += x * z0;
          xz1 += (x + 1) * z1;
          xz2 += (x + 2) * z2;
          xz3 += (x + 3) * z3;
          rzz += z0 * z0;
          zz1 += z1 * z1;
          zz2 += z2 * z2;
          zz3 += z3 * z3;
        }
        for (; x < x1; x += 1) {
          const z = pixels[base + x]! - shift;
          rz += z;
          rxz += x * z;
          rzz += z * z;
        }
        rz += z1s + z2s + z3s;
        rxz += xz1 + xz2 + xz3;
        rzz += zz1 + zz2 + zz3;
      }
      const len = x1 - x0;
      // Σx and Σx² of the integers x0..x1−1, in closed form.
      const rx = (len * (x0 + x1 - 1)) / 2;
      const rxx =
        ((x1 - 1) * x1 * (2 * x1 - 1) - (x0 - 1) * x0 * (2 * x0 - 1)) / 6;
      m.n += len;
      m.sx += rx;
      m.sy += y * len;
      m.sxx += rxx;
      m.sxy += y * rx;
      m.syy += y * y * len;
      m.sz += rz;
      m.sxz += rxz;
      m.syz += y * rz;
      m.szz += rzz;
    }
  }
  return m;
}

function firstSignal(
  pixels: PixelArray,
  columns: number,
  regions: readonly RegionSpans[],
  lut: SignalLookupTable | undefined,
): number {
  for (const region of regions) {
    if (region.count > 0) {
      const v = pixels[region.spans[0]! * columns + region.spans[1]!]!;
      return lut ? lut.table[v + lut.offset]! : v;
    }
  }
  return 0;
}

/**
 * Fits a plane by least squares to the signal of the given background
 * regions (one pass over their spans, no copy of the image) and reports the
 * SD about the plane beside the plain SD.
 *
 * The normal equations are solved on moments about the means; sums are
 * shifted by the first pixel's signal so they stay small.
 *
 * @param pixels row-major image, one value per pixel.
 * @param columns image width in pixels.
 * @param regions spans of the background regions (should not overlap).
 * @param lut optional linearisation, signal = table[value + offset].
 * @returns the plane and both SDs, in signal units.
 * @throws DomainError('region_empty') for fewer than 4 pixels;
 *   DomainError('analysis_failed') when the pixels lie on one line (a plane
 *   is then not determined) or the signal is not finite.
 * @see Draper & Smith, Applied Regression Analysis (3rd ed., 1998), ch. 5
 *   (least squares in matrix form; residual variance on n − p degrees).
 */
export function fitBackgroundPlane(
  pixels: PixelArray,
  columns: number,
  regions: readonly RegionSpans[],
  lut?: SignalLookupTable,
): BackgroundPlane {
  const shift = firstSignal(pixels, columns, regions, lut);
  const m = accumulate(pixels, columns, regions, lut, shift);
  if (m.n < 4) {
    throw new DomainError(
      'region_empty',
      `A background plane needs at least 4 pixels; the regions hold ${m.n}.`,
    );
  }
  const mx = m.sx / m.n;
  const my = m.sy / m.n;
  const mz = m.sz / m.n;
  const cxx = m.sxx - m.n * mx * mx;
  const cxy = m.sxy - m.n * mx * my;
  const cyy = m.syy - m.n * my * my;
  const cxz = m.sxz - m.n * mx * mz;
  const cyz = m.syz - m.n * my * mz;
  const czz = m.szz - m.n * mz * mz;
  const det = cxx * cyy - cxy * cxy;
  if (!(det > 1e-9 * cxx * cyy) || !Number.isFinite(czz)) {
    throw new DomainError(
      'analysis_failed',
      'The background pixels lie on one line or hold no finite signal, so no plane can be fitted; use a wider background region.',
    );
  }
  const b = (cyy * cxz - cxy * cyz) / det;
  const c = (cxx * cyz - cxy * cxz) / det;
  const residual = Math.max(0, czz - b * cxz - c * cyz);
  // Fitted in integer indices; the pixel centre is at index + 0.5.
  const interceptAtIndexOrigin = shift + mz - b * mx - c * my;
  return {
    intercept: interceptAtIndexOrigin - 0.5 * b - 0.5 * c,
    slopeXPerPx: b,
    slopeYPerPx: c,
    n: m.n,
    mean: shift + mz,
    sampleSdAboutPlane: Math.sqrt(residual / (m.n - 3)),
    plainSampleSd: Math.sqrt(Math.max(0, czz) / (m.n - 1)),
    centroidXPx: mx + 0.5,
    centroidYPx: my + 0.5,
    sumSquaresXPx2: cxx,
    sumProductsXYPx2: cxy,
    sumSquaresYPx2: cyy,
  };
}
