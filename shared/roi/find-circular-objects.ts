import type { RegionLayout } from '../analysis/region-layout.ts';
import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import { formatRegionSpec } from './region-geometry.ts';
import type { GreyImage, GreyImageInput } from './image-shift.ts';
import { blockAverage, boxMean, withoutPlane } from './image-shift.ts';

/** Whether objects are searched darker, brighter or either than their surround. */
export type ObjectPolarity = 'darker' | 'brighter' | 'either';

/** Options of {@link findCircularObjects}. */
export interface FindObjectsOptions {
  /** Smallest object radius, pixels; default 3. */
  minRadiusPx?: number;
  /** Largest object radius, pixels; default one sixth of the shorter side. */
  maxRadiusPx?: number;
  /** Default 'either'. */
  polarity?: ObjectPolarity;
  /** Detection threshold in SDs of the smoothed residual; default 5. */
  thresholdSd?: number;
  /** Area ÷ area of the enclosing circle, 0–1; default 0.75 (a square is 0.64). */
  minCircularity?: number;
  /** At most this many objects, the most conspicuous first; default 12. */
  maxObjects?: number;
}

/** A circular object found in the image, in full-resolution pixels. */
export interface FoundObject {
  /** Centre, pixel-centre coordinates (as the region specs use). */
  cx: number;
  cy: number;
  radiusPx: number;
  polarity: 'darker' | 'brighter';
  /** (S_bg − S_obj)/S_bg of the stored values, inner disc against a ring. */
  contrast: number;
  /** (S_bg − S_obj)/σ_bg of the stored values, same regions. */
  cnr: number;
  /** Area ÷ area of the enclosing circle. */
  circularity: number;
}

/** Result of {@link findCircularObjects}. */
export interface FoundObjects {
  objects: FoundObject[];
  /** Block size the search ran at (1: full resolution). */
  decimation: number;
  warnings: Warning[];
}

const MAX_SEARCH_SIZE_PX = 1024;
/** SD of a normal deviate per median absolute deviation. */
const MAD_TO_SD = 1.4826;

function robustSd(values: Float32Array): number {
  const step = Math.max(1, Math.floor(values.length / 200_000));
  const sample = new Float32Array(Math.ceil(values.length / step));
  for (let i = 0, k = 0; i < values.length; i += step, k += 1) {
    sample[k] = values[i]!;
  }
  sample.sort();
  const median = sample[sample.length >> 1]!;
  for (let k = 0; k < sample.length; k += 1) {
    sample[k] = Math.abs(sample[k]! - median);
  }
  sample.sort();
  return sample[sample.length >> 1]! * MAD_TO_SD;
}

function residual(
  smooth: GreyImage,
  radius: number,
  include: Uint8Array | null,
): Float32Array {
  const flat = withoutPlane(smooth, include);
  const background = boxMean(flat, radius, include);
  const out = new Float32Array(background.length);
  for (let i = 0; i < out.length; i += 1)
    out[i] = flat.pixels[i]! - background[i]!;
  return out;
}

/**
 * Pixels connected (8-neighbourhood) to `seed` for which `inside` holds;
 * `stamps` marks every pixel reached with `stamp`, so one buffer serves
 * every fill.
 */
function floodFill(
  columns: number,
  rows: number,
  seed: number,
  inside: (i: number) => boolean,
  stamps: Int32Array,
  stamp: number,
): number[] {
  const found: number[] = [];
  const stack = [seed];
  stamps[seed] = stamp;
  while (stack.length > 0) {
    const i = stack.pop()!;
    found.push(i);
    const x = i % columns;
    const y = (i - x) / columns;
    for (
      let ny = Math.max(0, y - 1);
      ny <= Math.min(rows - 1, y + 1);
      ny += 1
    ) {
      for (
        let nx = Math.max(0, x - 1);
        nx <= Math.min(columns - 1, x + 1);
        nx += 1
      ) {
        const j = ny * columns + nx;
        if (stamps[j] !== stamp && inside(j)) {
          stamps[j] = stamp;
          stack.push(j);
        }
      }
    }
  }
  return found;
}

interface Blob {
  cx: number;
  cy: number;
  radius: number;
  circularity: number;
  polarity: 'darker' | 'brighter';
}

function shapeOf(pixels: number[], columns: number): Omit<Blob, 'polarity'> {
  let sx = 0;
  let sy = 0;
  for (const i of pixels) {
    sx += (i % columns) + 0.5;
    sy += Math.floor(i / columns) + 0.5;
  }
  const cx = sx / pixels.length;
  const cy = sy / pixels.length;
  let farthest = 0;
  for (const i of pixels) {
    const d = Math.hypot(
      (i % columns) + 0.5 - cx,
      Math.floor(i / columns) + 0.5 - cy,
    );
    if (d > farthest) farthest = d;
  }
  // Pixel centres lie half a pixel inside the outline they sample.
  const enclosing = farthest + 0.5;
  return {
    cx,
    cy,
    radius: Math.sqrt(pixels.length / Math.PI),
    circularity: Math.min(1, pixels.length / (Math.PI * enclosing * enclosing)),
  };
}

function blobsOf(
  r: Float32Array,
  columns: number,
  rows: number,
  sign: 1 | -1,
  threshold: number,
): Blob[] {
  const DETECTED = 1;
  const stamps = new Int32Array(r.length);
  let nextStamp = DETECTED + 1;
  const blobs: Blob[] = [];
  const onEdge = (j: number): boolean => {
    const x = j % columns;
    const y = (j - x) / columns;
    return x === 0 || y === 0 || x === columns - 1 || y === rows - 1;
  };
  for (let i = 0; i < r.length; i += 1) {
    if (stamps[i] !== 0 || sign * r[i]! <= threshold) continue;
    const component = floodFill(
      columns,
      rows,
      i,
      (j) => stamps[j] === 0 && sign * r[j]! > threshold,
      stamps,
      DETECTED,
    );
    if (component.length < 3 || component.some(onEdge)) continue;
    // The outline is taken at half the object's peak (of the smoothed
    // residual), which lies on the true edge for a symmetric blur.
    const strengths = component.map((j) => sign * r[j]!).sort((a, b) => a - b);
    const peak = strengths[Math.floor(0.9 * (strengths.length - 1))]!;
    let seed = component[0]!;
    for (const j of component) if (sign * r[j]! > sign * r[seed]!) seed = j;
    const outline = floodFill(
      columns,
      rows,
      seed,
      (j) => sign * r[j]! >= peak / 2,
      stamps,
      nextStamp,
    );
    nextStamp += 1;
    if (outline.some(onEdge)) continue;
    blobs.push({
      ...shapeOf(outline, columns),
      polarity: sign < 0 ? 'darker' : 'brighter',
    });
  }
  return blobs;
}

/** Mean and sample SD of the full-resolution pixels with centre distance in (inner, outer]. */
function annulusStats(
  image: GreyImageInput,
  cx: number,
  cy: number,
  inner: number,
  outer: number,
): { mean: number; sampleSd: number; n: number } {
  let n = 0;
  let sum = 0;
  let sumSquares = 0;
  const x0 = Math.max(0, Math.floor(cx - outer));
  const x1 = Math.min(image.columns - 1, Math.ceil(cx + outer));
  const y0 = Math.max(0, Math.floor(cy - outer));
  const y1 = Math.min(image.rows - 1, Math.ceil(cy + outer));
  const first = image.pixels[0]!;
  for (let y = y0; y <= y1; y += 1) {
    for (let x = x0; x <= x1; x += 1) {
      const d2 = (x + 0.5 - cx) ** 2 + (y + 0.5 - cy) ** 2;
      if (d2 > outer * outer || (inner >= 0 && d2 <= inner * inner)) continue;
      // Shifted by the first pixel so the sum of squares keeps its digits.
      const v = image.pixels[y * image.columns + x]! - first;
      n += 1;
      sum += v;
      sumSquares += v * v;
    }
  }
  const mean = sum / n;
  return {
    mean: mean + first,
    sampleSd:
      n > 1
        ? Math.sqrt(Math.max(0, (sumSquares - n * mean * mean) / (n - 1)))
        : 0,
    n,
  };
}

/**
 * Finds circular contrast objects (discs of a contrast phantom, lead
 * discs): the image is block-averaged to at most 1024 pixels a side,
 * smoothed over half the smallest radius, freed of its least-squares plane
 * (heel ramp) and compared with its local background (a window mean over
 * 2.5 × the largest radius); plane and background are recomputed with the
 * first detections left out; pixels beyond `thresholdSd` robust SDs
 * (median absolute deviation) form 8-connected components; each is outlined
 * at half its peak, and kept when it does not touch the image edge, its
 * equivalent radius √(A/π) lies within the limits and its circularity
 * reaches `minCircularity`. Contrast and CNR are measured on the full
 * image: a disc of 0.7 r against a ring from 1.5 r to 2.5 r.
 * @param image row-major stored values.
 * @returns objects, most conspicuous (|CNR|) first.
 * @throws DomainError('validation_failed') for radius limits that make no
 *   sense or an image smaller than 16 × 16.
 * @see Gonzalez & Woods, Digital Image Processing (4th ed.), §10.3
 *   (thresholding) and §9.5 (connected components); Rousseeuw & Croux,
 *   JASA 1993;88:1273 (MAD as a robust scale).
 */
export function findCircularObjects(
  image: GreyImageInput,
  options: FindObjectsOptions = {},
): FoundObjects {
  const { columns, rows } = image;
  if (columns < 16 || rows < 16) {
    throw new DomainError(
      'validation_failed',
      'The image is too small to search for objects.',
    );
  }
  const minRadius = options.minRadiusPx ?? 3;
  const maxRadius = options.maxRadiusPx ?? Math.min(columns, rows) / 6;
  if (!(minRadius >= 1 && maxRadius > minRadius)) {
    throw new DomainError(
      'validation_failed',
      `Object radius limits ${minRadius}–${maxRadius} px make no range (the smallest is at least 1 px).`,
    );
  }
  const factor = Math.max(
    1,
    Math.min(
      Math.ceil(Math.max(columns, rows) / MAX_SEARCH_SIZE_PX),
      Math.floor(minRadius / 1.5),
    ),
  );
  const work = blockAverage(image.pixels, columns, columns, rows, factor);
  const smoothRadius = Math.max(1, Math.round(minRadius / factor / 2));
  const smooth = { ...work, pixels: boxMean(work, smoothRadius) };
  const backgroundRadius = Math.max(
    4 * smoothRadius,
    Math.round((2.5 * maxRadius) / factor),
  );
  const threshold = options.thresholdSd ?? 5;
  const first = residual(smooth, backgroundRadius, null);
  const firstSd = robustSd(first);
  const include = Uint8Array.from(first, (v) =>
    Math.abs(v) > 3 * firstSd ? 0 : 1,
  );
  const r = residual(smooth, backgroundRadius, include);
  const sd = robustSd(r);
  const warnings: Warning[] = [];
  if (!(sd > 0)) {
    return {
      objects: [],
      decimation: factor,
      warnings: [
        {
          code: 'image_uniform',
          message: 'The image has no noise or structure to search.',
        },
      ],
    };
  }
  const polarity = options.polarity ?? 'either';
  const blobs = [
    ...(polarity !== 'brighter'
      ? blobsOf(r, work.columns, work.rows, -1, threshold * sd)
      : []),
    ...(polarity !== 'darker'
      ? blobsOf(r, work.columns, work.rows, 1, threshold * sd)
      : []),
  ];
  const minCircularity = options.minCircularity ?? 0.75;
  const objects = blobs
    .map((b) => ({
      ...b,
      cx: b.cx * factor,
      cy: b.cy * factor,
      radius: b.radius * factor,
    }))
    .filter(
      (b) =>
        b.radius >= minRadius &&
        b.radius <= maxRadius &&
        b.circularity >= minCircularity,
    )
    .map((b): FoundObject => {
      const object = annulusStats(image, b.cx, b.cy, -1, 0.7 * b.radius);
      const ring = annulusStats(
        image,
        b.cx,
        b.cy,
        1.5 * b.radius,
        2.5 * b.radius,
      );
      return {
        cx: b.cx,
        cy: b.cy,
        radiusPx: b.radius,
        polarity: b.polarity,
        contrast: ring.mean !== 0 ? (ring.mean - object.mean) / ring.mean : 0,
        cnr: ring.sampleSd > 0 ? (ring.mean - object.mean) / ring.sampleSd : 0,
        circularity: b.circularity,
      };
    })
    .sort((a, b) => Math.abs(b.cnr) - Math.abs(a.cnr));
  const limit = options.maxObjects ?? 12;
  if (objects.length > limit) {
    warnings.push({
      code: 'objects_truncated',
      message: `${objects.length} objects were found; the ${limit} most conspicuous are proposed.`,
    });
  }
  return { objects: objects.slice(0, limit), decimation: factor, warnings };
}

const round1 = (v: number): number => Math.round(v * 10) / 10;

/**
 * Region layout entries for found objects: for object k a circle `object k`
 * of 0.7 r (clear of the blurred edge) measured against a ring
 * `background k` from 1.5 r to 2.5 r, shrunk where it would reach another
 * object (with a warning when too little ring is left).
 * @returns regions in pixels, ready for a layout with units "px".
 */
export function proposeObjectRegions(objects: readonly FoundObject[]): {
  regions: RegionLayout['regions'];
  warnings: Warning[];
} {
  const warnings: Warning[] = [];
  const regions = objects.flatMap((o, k) => {
    const inner = 1.5 * o.radiusPx;
    let outer = 2.5 * o.radiusPx;
    for (const other of objects) {
      if (other === o) continue;
      const clearance =
        Math.hypot(other.cx - o.cx, other.cy - o.cy) - 1.2 * other.radiusPx;
      if (clearance < outer) outer = clearance;
    }
    if (outer < inner + 1) {
      outer = inner + 1;
      warnings.push({
        code: 'background_ring_crowded',
        message: `The background ring of object ${k + 1} reaches a neighbouring object; move or resize it.`,
      });
    }
    const name = String(k + 1);
    return [
      {
        name: `object ${name}`,
        role: 'object' as const,
        spec: formatRegionSpec({
          shape: 'circle',
          cx: round1(o.cx),
          cy: round1(o.cy),
          r: Math.max(1, round1(0.7 * o.radiusPx)),
        }),
        background: [`background ${name}`],
      },
      {
        name: `background ${name}`,
        role: 'background' as const,
        spec: formatRegionSpec({
          shape: 'ring',
          cx: round1(o.cx),
          cy: round1(o.cy),
          rInner: round1(inner),
          rOuter: round1(outer),
        }),
      },
    ];
  });
  return { regions, warnings };
}
