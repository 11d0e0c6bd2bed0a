import type { Region } from './region-geometry.ts';
import { validateRegion } from './region-geometry.ts';

/**
 * The pixels of a region inside an image, as horizontal runs.
 * `spans` holds `count` triples (y, xStart, xEndExclusive), rows ascending and
 * runs within a row ascending and disjoint; `pixelCount` is their total length;
 * `clipped` is true when part of the region lies outside the image.
 */
export interface RegionSpans {
  spans: Int32Array;
  count: number;
  pixelCount: number;
  clipped: boolean;
}

/** Unclipped runs [xStart, xEnd) of one row, pushed as pairs into `out`. */
type RowRuns = (y: number, out: number[]) => void;

/**
 * Smallest integer x near `guess` for which `inside` holds (inside is true on
 * one interval); null when the interval holds no integer.
 */
function adjustStart(
  guess: number,
  inside: (x: number) => boolean,
): number | null {
  let x = guess;
  while (inside(x - 1)) x -= 1;
  let steps = 0;
  while (!inside(x)) {
    x += 1;
    steps += 1;
    if (steps > 2) return null;
  }
  return x;
}

/**
 * Pixel run of a disc in one row: integers x with (x+0.5−cx)² + dy² ≤ r².
 * The square root gives a guess; the exact inequality then decides the ends,
 * so pixels on the boundary follow the definition, not rounding.
 */
function discRun(cx: number, r2: number, dy2: number): [number, number] | null {
  if (dy2 > r2) return null;
  const inside = (x: number): boolean => {
    const dx = x + 0.5 - cx;
    return dx * dx + dy2 <= r2;
  };
  const half = Math.sqrt(r2 - dy2);
  const start = adjustStart(Math.ceil(cx - half - 0.5), inside);
  if (start === null) return null;
  let end = Math.floor(cx + half - 0.5) + 1;
  if (end <= start) end = start + 1;
  while (inside(end)) end += 1;
  while (end > start + 1 && !inside(end - 1)) end -= 1;
  return [start, end];
}

function circleRuns(cx: number, cy: number, r: number): RowRuns {
  const r2 = r * r;
  return (y, out) => {
    const dy = y + 0.5 - cy;
    const run = discRun(cx, r2, dy * dy);
    if (run) out.push(run[0], run[1]);
  };
}

function ringRuns(
  cx: number,
  cy: number,
  rInner: number,
  rOuter: number,
): RowRuns {
  const outer2 = rOuter * rOuter;
  const inner2 = rInner * rInner;
  return (y, out) => {
    const dy = y + 0.5 - cy;
    const dy2 = dy * dy;
    const run = discRun(cx, outer2, dy2);
    if (!run) return;
    const hole = discRun(cx, inner2, dy2);
    if (!hole) {
      out.push(run[0], run[1]);
      return;
    }
    // The hole (d² ≤ rInner²) lies inside the outer run of the same row.
    if (hole[0] > run[0]) out.push(run[0], hole[0]);
    if (run[1] > hole[1]) out.push(hole[1], run[1]);
  };
}

function polygonRuns(points: Array<[number, number]>): RowRuns {
  const crossings: number[] = [];
  return (y, out) => {
    const yc = y + 0.5;
    crossings.length = 0;
    for (let i = 0, j = points.length - 1; i < points.length; j = i, i += 1) {
      const [x1, y1] = points[j]!;
      const [x2, y2] = points[i]!;
      // Half-open in y so a vertex on the scan line is counted once.
      if (y1 <= yc !== y2 <= yc) {
        crossings.push(x1 + ((yc - y1) * (x2 - x1)) / (y2 - y1));
      }
    }
    crossings.sort((a, b) => a - b);
    for (let k = 0; k + 1 < crossings.length; k += 2) {
      // Centre x+0.5 in [xa, xb): x from ceil(xa−0.5) to ceil(xb−0.5)−1.
      const start = Math.ceil(crossings[k]! - 0.5);
      const end = Math.ceil(crossings[k + 1]! - 0.5);
      if (end > start) out.push(start, end);
    }
  };
}

/** Rows [yStart, yEnd) that may hold pixels, and the run generator. */
function describe(region: Region): {
  yStart: number;
  yEnd: number;
  runs: RowRuns;
} {
  switch (region.shape) {
    case 'rect': {
      const xStart = Math.ceil(region.x0);
      const xEnd = Math.ceil(region.x0 + region.w);
      const yStart = Math.ceil(region.y0);
      // A rectangle narrower than one pixel centre holds no rows at all.
      const yEnd = xEnd > xStart ? Math.ceil(region.y0 + region.h) : yStart;
      return {
        yStart,
        yEnd,
        runs: (_y, out) => {
          out.push(xStart, xEnd);
        },
      };
    }
    case 'circle':
      return {
        yStart: Math.floor(region.cy - region.r - 0.5),
        yEnd: Math.ceil(region.cy + region.r + 0.5),
        runs: circleRuns(region.cx, region.cy, region.r),
      };
    case 'ring':
      return {
        yStart: Math.floor(region.cy - region.rOuter - 0.5),
        yEnd: Math.ceil(region.cy + region.rOuter + 0.5),
        runs: ringRuns(region.cx, region.cy, region.rInner, region.rOuter),
      };
    case 'polygon': {
      let yMin = Infinity;
      let yMax = -Infinity;
      for (const [, y] of region.points) {
        yMin = Math.min(yMin, y);
        yMax = Math.max(yMax, y);
      }
      return {
        yStart: Math.floor(yMin - 0.5),
        yEnd: Math.ceil(yMax + 0.5),
        runs: polygonRuns(region.points),
      };
    }
  }
}

/**
 * Lists the pixels of a region that fall inside a columns × rows image, using
 * the pixel-centre convention of {@link Region}.
 *
 * @param region in pixel coordinates.
 * @param columns image width in pixels.
 * @param rows image height in pixels.
 * @returns runs clipped to the image; `pixelCount` 0 when nothing is inside
 *   (the caller decides whether that is an error).
 * @throws DomainError('region_invalid') for an invalid region.
 */
export function regionSpans(
  region: Region,
  columns: number,
  rows: number,
): RegionSpans {
  validateRegion(region);
  const { yStart, yEnd, runs } = describe(region);
  const row: number[] = [];
  let clipped = false;
  // Rows outside the image only tell whether the region is clipped: stop at
  // the first one that holds a pixel.
  for (let y = yStart; y < Math.min(yEnd, 0) && !clipped; y += 1) {
    row.length = 0;
    runs(y, row);
    clipped = row.length > 0;
  }
  for (let y = Math.max(yStart, rows); y < yEnd && !clipped; y += 1) {
    row.length = 0;
    runs(y, row);
    clipped = row.length > 0;
  }
  const first = Math.max(yStart, 0);
  const last = Math.min(yEnd, rows);
  let spans = new Int32Array(Math.max(1, last - first) * 6);
  let count = 0;
  let pixelCount = 0;
  for (let y = first; y < last; y += 1) {
    row.length = 0;
    runs(y, row);
    for (let k = 0; k < row.length; k += 2) {
      const start = row[k]!;
      const end = row[k + 1]!;
      if (start < 0 || end > columns) clipped = true;
      const xStart = Math.max(start, 0);
      const xEnd = Math.min(end, columns);
      if (xEnd <= xStart) continue;
      if ((count + 1) * 3 > spans.length) {
        const grown = new Int32Array(spans.length * 2);
        grown.set(spans);
        spans = grown;
      }
      spans[count * 3] = y;
      spans[count * 3 + 1] = xStart;
      spans[count * 3 + 2] = xEnd;
      count += 1;
      pixelCount += xEnd - xStart;
    }
  }
  return { spans, count, pixelCount, clipped };
}
