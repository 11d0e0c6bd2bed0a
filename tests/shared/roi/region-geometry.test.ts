import { describe, expect, it } from 'vitest';
import { DomainError } from '../../../shared/errors.ts';
import {
  formatRegionSpec,
  parseRegionSpec,
  regionFromMm,
} from '../../../shared/roi/region-geometry.ts';
import { regionSpans } from '../../../shared/roi/region-mask.ts';

describe('parseRegionSpec', () => {
  it.each([
    ['circle:10,20,5', { shape: 'circle', cx: 10, cy: 20, r: 5 }],
    ['rect:0,1,2.5,3', { shape: 'rect', x0: 0, y0: 1, w: 2.5, h: 3 }],
    ['ring:5,6,2,4', { shape: 'ring', cx: 5, cy: 6, rInner: 2, rOuter: 4 }],
    [
      'polygon:0,0;4,0;0,3',
      {
        shape: 'polygon',
        points: [
          [0, 0],
          [4, 0],
          [0, 3],
        ],
      },
    ],
  ])('parses %s', (spec, expected) => {
    const region = parseRegionSpec(spec);

    expect(region).toEqual(expected);
    expect(parseRegionSpec(formatRegionSpec(region))).toEqual(expected);
  });

  it.each([
    'circle:1,2',
    'circle:1,2,0',
    'circle:1,2,-3',
    'circle:a,2,3',
    'circle:1,,3',
    'rect:0,0,0,5',
    'ring:5,5,4,4',
    'ring:5,5,-1,4',
    'polygon:0,0;1,1',
    'square:1,2,3',
    'circle:1e9,0,3',
    'circle:Infinity,0,3',
    '',
  ])('rejects %j with region_invalid', (spec) => {
    expect(() => parseRegionSpec(spec)).toThrow(
      expect.objectContaining({ code: 'region_invalid' }),
    );
    expect(() => parseRegionSpec(spec)).toThrow(DomainError);
  });
});

describe('regionFromMm', () => {
  it('divides x by the column spacing and y by the row spacing', () => {
    const region = regionFromMm(
      { shape: 'rect', x0: 1, y0: 2, w: 3, h: 4 },
      { rowMm: 0.5, columnMm: 0.25 },
    );

    expect(region).toEqual({ shape: 'rect', x0: 4, y0: 4, w: 12, h: 8 });
  });

  it('keeps a circle a circle when pixels are square', () => {
    expect(
      regionFromMm(
        { shape: 'circle', cx: 1, cy: 2, r: 3 },
        { rowMm: 0.1, columnMm: 0.1 },
      ),
    ).toEqual({ shape: 'circle', cx: 10, cy: 20, r: 30 });
  });

  it('turns a circle into an ellipse polygon for non-square pixels', () => {
    // 10 mm radius with 0.1 mm columns and 0.2 mm rows: semi-axes 100 and 50 px.
    const region = regionFromMm(
      { shape: 'circle', cx: 20, cy: 20, r: 10 },
      { rowMm: 0.2, columnMm: 0.1 },
    );
    const spans = regionSpans(region, 400, 200);

    expect(region.shape).toBe('polygon');
    // Ellipse area π·a·b (geometry, common practice) within the boundary pixels.
    expect(spans.pixelCount).toBeGreaterThan(Math.PI * 100 * 50 - 2 * 150);
    expect(spans.pixelCount).toBeLessThan(Math.PI * 100 * 50 + 2 * 150);
    const rows = new Set<number>();
    for (let k = 0; k < spans.count; k += 1) rows.add(spans.spans[k * 3]!);
    expect(Math.min(...rows)).toBe(50);
    expect(Math.max(...rows)).toBe(149);
  });

  it('turns a ring into an annulus polygon for non-square pixels', () => {
    const region = regionFromMm(
      { shape: 'ring', cx: 20, cy: 20, rInner: 5, rOuter: 10 },
      { rowMm: 0.2, columnMm: 0.1 },
    );
    const spans = regionSpans(region, 400, 200);
    const centreRow = [];
    for (let k = 0; k < spans.count; k += 1) {
      if (spans.spans[k * 3] === 100) {
        centreRow.push([spans.spans[k * 3 + 1], spans.spans[k * 3 + 2]]);
      }
    }

    // Annulus area π·(a·b − a'·b') (geometry, common practice).
    const area = Math.PI * (100 * 50 - 50 * 25);
    expect(Math.abs(spans.pixelCount - area)).toBeLessThan(450);
    // Through the centre the hole spans x in [150, 250): two runs either side.
    expect(centreRow).toEqual([
      [100, 150],
      [250, 300],
    ]);
  });

  it('rejects a zero pixel spacing', () => {
    expect(() =>
      regionFromMm(
        { shape: 'circle', cx: 1, cy: 1, r: 1 },
        { rowMm: 0, columnMm: 0.1 },
      ),
    ).toThrow(expect.objectContaining({ code: 'region_invalid' }));
  });
});
