import { describe, expect, it } from 'vitest';
import { parseRegionLayout } from '../../../shared/analysis/region-layout.ts';
import { DomainError } from '../../../shared/errors.ts';
import {
  blockAverage,
  boxMean,
  estimateImageShift,
  placeLayout,
  translateRegion,
} from '../../../shared/roi/image-shift.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';

interface Disc {
  cx: number;
  cy: number;
  r: number;
  factor: number;
}

/**
 * A phantom-like scene: a flat field with a heel ramp, discs of known
 * position, Gaussian noise. Moving the discs by (dx, dy) is an exact,
 * sub-pixel shift of the phantom, so the answer is known by construction.
 */
function scene(options: {
  columns: number;
  rows: number;
  discs: Disc[];
  dx?: number;
  dy?: number;
  level?: number;
  noiseSd?: number;
  seed?: number;
}): Uint16Array {
  const { columns, rows, discs, dx = 0, dy = 0, level = 2000 } = options;
  const random = createSeededRandom(options.seed ?? 1);
  const out = new Uint16Array(columns * rows);
  // Supersampling 4 × 4 per pixel gives partial-area edges, so a fractional
  // shift changes the image as a real one would.
  for (let y = 0; y < rows; y += 1) {
    for (let x = 0; x < columns; x += 1) {
      let value = 0;
      for (let sy = 0; sy < 4; sy += 1) {
        for (let sx = 0; sx < 4; sx += 1) {
          const px = x + (sx + 0.5) / 4;
          const py = y + (sy + 0.5) / 4;
          let v = level * (1 + 0.0004 * (px - columns / 2));
          for (const d of discs) {
            if ((px - d.cx - dx) ** 2 + (py - d.cy - dy) ** 2 <= d.r * d.r) {
              v *= d.factor;
            }
          }
          value += v / 16;
        }
      }
      out[y * columns + x] = Math.round(
        value + (options.noiseSd ?? 8) * random.normal(),
      );
    }
  }
  return out;
}

const DISCS: Disc[] = [
  { cx: 60, cy: 70, r: 14, factor: 0.85 },
  { cx: 150, cy: 60, r: 9, factor: 0.9 },
  { cx: 110, cy: 150, r: 20, factor: 0.8 },
  { cx: 190, cy: 170, r: 6, factor: 0.3 },
];

describe('blockAverage and boxMean', () => {
  it('averages 2 × 2 blocks, a cut block over what it holds', () => {
    // Hand-worked: 3 × 2 image [1 2 3; 4 5 6] → [(1+2+4+5)/4, (3+6)/2].
    const out = blockAverage([1, 2, 3, 4, 5, 6], 3, 3, 2, 2);
    expect(out.columns).toBe(2);
    expect(out.rows).toBe(1);
    expect([...out.pixels]).toEqual([3, 4.5]);
  });

  it('takes window means cut at the edges, and leaves excluded pixels out', () => {
    const image = {
      pixels: Float32Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9]),
      columns: 3,
      rows: 3,
    };
    // Hand-worked 3 × 3 means: corner (0,0) over [1,2,4,5] = 3; centre over all = 5.
    const means = boxMean(image, 1);
    expect(means[0]).toBeCloseTo(3, 6);
    expect(means[4]).toBeCloseTo(5, 6);
    const include = Uint8Array.from([1, 1, 1, 1, 0, 1, 1, 1, 1]);
    // Without the centre pixel (5): (45 − 5)/8 = 5, corner (1+2+4)/3.
    expect(boxMean(image, 1, include)[4]).toBeCloseTo(5, 6);
    expect(boxMean(image, 1, include)[0]).toBeCloseTo(7 / 3, 6);
  });
});

describe('estimateImageShift', () => {
  const size = { columns: 240, rows: 220 };
  const reference = {
    ...size,
    pixels: scene({ ...size, discs: DISCS, seed: 1 }),
  };

  it.each([
    [0, 0],
    [7, -4],
    [-12, 9],
    [3.5, 2.25],
  ])('finds a phantom moved by (%d, %d) within 0.35 px', (dx, dy) => {
    const moving = {
      ...size,
      // A grid image: lower signal and fresh noise, same phantom moved.
      pixels: scene({ ...size, discs: DISCS, dx, dy, level: 900, seed: 2 }),
    };
    const shift = estimateImageShift(reference, moving);
    expect(Math.abs(shift.dxPx - dx)).toBeLessThan(0.35);
    expect(Math.abs(shift.dyPx - dy)).toBeLessThan(0.35);
    expect(shift.confidence).toBeGreaterThan(0.5);
  });

  it('works on block-averaged levels for a large image, to within the block size', () => {
    const large = { columns: 1600, rows: 1200 };
    const scale = (d: Disc): Disc => ({
      ...d,
      cx: d.cx * 6,
      cy: d.cy * 5,
      r: d.r * 5,
    });
    const a = {
      ...large,
      pixels: scene({ ...large, discs: DISCS.map(scale), seed: 3 }),
    };
    const b = {
      ...large,
      pixels: scene({
        ...large,
        discs: DISCS.map(scale),
        dx: 41,
        dy: -23,
        seed: 4,
      }),
    };
    const shift = estimateImageShift(a, b);
    expect(Math.abs(shift.dxPx - 41)).toBeLessThan(1.5);
    expect(Math.abs(shift.dyPx + 23)).toBeLessThan(1.5);
  });

  it('reports low confidence when the images share no structure', () => {
    const a = { ...size, pixels: scene({ ...size, discs: [], seed: 5 }) };
    const b = { ...size, pixels: scene({ ...size, discs: [], seed: 6 }) };
    expect(estimateImageShift(a, b).confidence).toBeLessThan(0.2);
  });

  it('refuses images too small to compare', () => {
    const tiny = { columns: 8, rows: 8, pixels: new Uint16Array(64) };
    expect(() => estimateImageShift(tiny, tiny)).toThrow(DomainError);
  });
});

describe('placing a layout on an image', () => {
  const layout = parseRegionLayout({
    name: 'Disc phantom',
    regions: [
      { name: 'disc', role: 'object', spec: 'circle:50,60,10' },
      { name: 'ring', role: 'background', spec: 'ring:50,60,15,25' },
      { name: 'field', role: 'background', spec: 'rect:5,5,20,10' },
    ],
  });

  it('moves every region by the offset and keeps names and order', () => {
    const placed = placeLayout(
      layout,
      { dxPx: 2.5, dyPx: -3, overrides: {} },
      null,
    );
    expect(placed.regions.map((r) => [r.name, r.spec])).toEqual([
      ['disc', 'circle:52.5,57,10'],
      ['ring', 'ring:52.5,57,15,25'],
      ['field', 'rect:7.5,2,20,10'],
    ]);
  });

  it('puts an image override in place of the shifted region', () => {
    const placed = placeLayout(
      layout,
      { dxPx: 1, dyPx: 1, overrides: { disc: 'circle:40,40,8' } },
      null,
    );
    expect(placed.regions[0]!.spec).toBe('circle:40,40,8');
    expect(placed.regions[1]!.spec).toBe('ring:51,61,15,25');
  });

  it('converts the offset to mm for a layout in mm', () => {
    const mm = { ...layout, units: 'mm' as const };
    const placed = placeLayout(
      mm,
      { dxPx: 10, dyPx: 4, overrides: {} },
      { rowMm: 0.2, columnMm: 0.1 },
    );
    // 10 px × 0.1 mm = 1 mm across, 4 px × 0.2 mm = 0.8 mm down.
    expect(placed.regions[0]!.spec).toBe('circle:51,60.8,10');
    expect(() =>
      placeLayout(mm, { dxPx: 1, dyPx: 0, overrides: {} }, null),
    ).toThrow(DomainError);
  });

  it('refuses an override for a region the layout does not have', () => {
    expect(() =>
      placeLayout(
        layout,
        { dxPx: 0, dyPx: 0, overrides: { other: 'circle:1,1,1' } },
        null,
      ),
    ).toThrow(/not in the layout/);
  });

  it('translates polygons point by point', () => {
    expect(
      translateRegion(
        {
          shape: 'polygon',
          points: [
            [0, 0],
            [4, 0],
            [0, 3],
          ],
        },
        1,
        2,
      ),
    ).toEqual({
      shape: 'polygon',
      points: [
        [1, 2],
        [5, 2],
        [1, 5],
      ],
    });
  });
});
