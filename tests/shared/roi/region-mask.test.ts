import { describe, expect, it } from 'vitest';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { regionSpans } from '../../../shared/roi/region-mask.ts';

/** Pixels of a region as "x,y" strings, from its spans. */
function pixelsOf(region: Region, columns: number, rows: number): string[] {
  const { spans, count } = regionSpans(region, columns, rows);
  const out: string[] = [];
  for (let k = 0; k < count; k += 1) {
    for (let x = spans[k * 3 + 1]!; x < spans[k * 3 + 2]!; x += 1) {
      out.push(`${x},${spans[k * 3]}`);
    }
  }
  return out;
}

/** The same, straight from the definition in the measure contract. */
function pixelsByDefinition(
  inside: (xc: number, yc: number) => boolean,
  columns: number,
  rows: number,
): string[] {
  const out: string[] = [];
  for (let y = 0; y < rows; y += 1) {
    for (let x = 0; x < columns; x += 1) {
      if (inside(x + 0.5, y + 0.5)) out.push(`${x},${y}`);
    }
  }
  return out;
}

describe('regionSpans', () => {
  it('holds the 4 pixels around a lattice point for circle:2,2,1 (hand-checked)', () => {
    // Centres (1.5,1.5),(2.5,1.5),(1.5,2.5),(2.5,2.5) are at d² = 0.5 ≤ 1;
    // the next ones, e.g. (0.5,1.5), at d² = 2.5.
    expect(pixelsOf({ shape: 'circle', cx: 2, cy: 2, r: 1 }, 5, 5)).toEqual([
      '1,1',
      '2,1',
      '1,2',
      '2,2',
    ]);
  });

  it('includes centres exactly on the circle (d² = r²)', () => {
    // Centre of pixel (1,0) is (1.5,0.5): d² to (1.5,1.5) is exactly 1.
    const pixels = pixelsOf({ shape: 'circle', cx: 1.5, cy: 1.5, r: 1 }, 3, 3);

    expect(pixels).toEqual(['1,0', '0,1', '1,1', '2,1', '1,2']);
  });

  it('holds X0 ≤ x < X0+W and Y0 ≤ y < Y0+H for a rect', () => {
    expect(pixelsOf({ shape: 'rect', x0: 1, y0: 0, w: 2, h: 2 }, 4, 3)).toEqual(
      ['1,0', '2,0', '1,1', '2,1'],
    );
  });

  it('excludes d² ≤ rInner² and keeps d² ≤ rOuter² for a ring', () => {
    // Centres around (5,5) sit at d² = 0.5, 2.5, 4.5, …: only the 8 pixels
    // at 2.5 lie in 1 < d² ≤ 4.
    const region: Region = {
      shape: 'ring',
      cx: 5,
      cy: 5,
      rInner: 1,
      rOuter: 2,
    };
    const expected = pixelsByDefinition(
      (xc, yc) => {
        const d2 = (xc - 5) ** 2 + (yc - 5) ** 2;
        return d2 > 1 && d2 <= 4;
      },
      10,
      10,
    );

    expect(pixelsOf(region, 10, 10)).toEqual(expected);
    expect(expected).toHaveLength(8);
  });

  it('fills a triangle by pixel centre (even–odd)', () => {
    // Hand-checked: the hypotenuse x/4 + y/3 = 1 passes the centres' rows at
    // x = 3.33 (y 0.5), 2 (y 1.5), 0.67 (y 2.5).
    const pixels = pixelsOf(
      {
        shape: 'polygon',
        points: [
          [0, 0],
          [4, 0],
          [0, 3],
        ],
      },
      4,
      3,
    );

    expect(pixels).toEqual(['0,0', '1,0', '2,0', '0,1', '1,1', '0,2']);
  });

  it('leaves out the hole of a self-overlapping polygon (even–odd)', () => {
    // Two nested squares walked as one path: the inner one is a hole.
    const region: Region = {
      shape: 'polygon',
      points: [
        [0, 0],
        [6, 0],
        [6, 6],
        [0, 6],
        [0, 0],
        [2, 2],
        [2, 4],
        [4, 4],
        [4, 2],
        [2, 2],
      ],
    };

    const pixels = pixelsOf(region, 6, 6);

    expect(pixels).toHaveLength(36 - 4);
    expect(pixels).not.toContain('2,2');
    expect(pixels).not.toContain('3,3');
  });

  it('agrees with the definition for many circles at awkward centres', () => {
    for (const [cx, cy, r] of [
      [3.25, 4.75, 2.5],
      [0, 0, 3],
      [7.5, 2, 4.001],
      [5, 5, 0.5],
      [9.9, 9.9, 1.2],
    ] as const) {
      const expected = pixelsByDefinition(
        (xc, yc) => (xc - cx) ** 2 + (yc - cy) ** 2 <= r * r,
        10,
        10,
      );
      expect(pixelsOf({ shape: 'circle', cx, cy, r }, 10, 10)).toEqual(
        expected,
      );
    }
  });

  it('clips a region touching the edge and says so', () => {
    const result = regionSpans({ shape: 'circle', cx: 0, cy: 0, r: 2 }, 8, 8);

    expect(result.clipped).toBe(true);
    // Centres (0.5,0.5), (1.5,0.5), (0.5,1.5) lie within 2 of the corner;
    // (1.5,1.5) is at d² = 4.5 > 4 (hand-checked).
    expect(result.pixelCount).toBe(3);
  });

  it('does not call a region clipped when it only touches the edge from inside', () => {
    const result = regionSpans(
      { shape: 'rect', x0: 0, y0: 0, w: 8, h: 8 },
      8,
      8,
    );

    expect(result.clipped).toBe(false);
    expect(result.pixelCount).toBe(64);
  });

  it('reports no pixels for a region wholly outside the image', () => {
    const result = regionSpans(
      { shape: 'rect', x0: 20, y0: 20, w: 3, h: 3 },
      8,
      8,
    );

    expect(result).toMatchObject({ pixelCount: 0, count: 0, clipped: true });
  });

  it('reports no pixels for a circle that holds no pixel centre', () => {
    const result = regionSpans({ shape: 'circle', cx: 1, cy: 1, r: 0.5 }, 4, 4);

    expect(result).toMatchObject({ pixelCount: 0, clipped: false });
  });
});
