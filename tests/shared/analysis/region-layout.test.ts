import { readFileSync } from 'node:fs';
import { sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  measureLayout,
  poolRegionSignals,
} from '../../../shared/analysis/layout-measurement.ts';
import {
  parseRegionLayout,
  resolveRegionLayout,
} from '../../../shared/analysis/region-layout.ts';

describe('region layouts', () => {
  it('reads the committed example layout and places it through the pixel spacing', () => {
    const layout = parseRegionLayout(
      JSON.parse(
        readFileSync('fixtures/layouts/disc-and-beam-stops.json', 'utf8'),
      ),
    );

    const resolved = resolveRegionLayout(layout, { rowMm: 0.2, columnMm: 0.2 });

    expect(resolved.objects).toEqual([
      {
        name: 'disc',
        region: { shape: 'circle', cx: 200, cy: 200, r: 30 },
        backgrounds: ['ring'],
      },
    ]);
    expect(resolved.beamStops.map((b) => b.diameterMm)).toEqual([4, 8, 12]);
    expect(() => resolveRegionLayout(layout, null)).toThrow(
      expect.objectContaining({ code: 'region_invalid' }),
    );
  });

  it.each([
    [
      {
        name: 'x',
        regions: [
          { name: 'a', role: 'object', spec: 'circle:1,1,1' },
          { name: 'a', role: 'background', spec: 'circle:5,5,1' },
        ],
      },
      'used twice',
    ],
    [
      {
        name: 'x',
        regions: [
          { name: 'a', role: 'object', spec: 'circle:1,1,1' },
          { name: 'b', role: 'object', spec: 'circle:5,5,1' },
        ],
      },
      'background',
    ],
    [
      {
        name: 'x',
        regions: [
          {
            name: 'a',
            role: 'object',
            spec: 'circle:1,1,1',
            background: ['z'],
          },
          { name: 'b', role: 'background', spec: 'circle:5,5,1' },
        ],
      },
      "'z'",
    ],
    [
      {
        name: 'x',
        regions: [
          { name: 'a', role: 'beam-stop', spec: 'circle:1,1,1' },
          { name: 'b', role: 'background', spec: 'circle:5,5,1' },
        ],
      },
      'diameter',
    ],
  ])('refuses a bad layout (%#) naming the problem', (input, words) => {
    expect(() => parseRegionLayout(input)).toThrow(
      expect.objectContaining({
        code: 'validation_failed',
        message: expect.stringContaining(words),
      }),
    );
  });

  it('pools background regions as their union (checked against simple-statistics)', () => {
    const a = [1, 2, 3, 4];
    const b = [10, 12, 11];
    const stats = (v: number[]) => ({
      n: v.length,
      mean: v.reduce((s, x) => s + x, 0) / v.length,
      sampleSd: sampleStandardDeviation(v),
    });

    const pooled = poolRegionSignals([stats(a), stats(b)]);

    // simple-statistics sample SD of the concatenated values.
    expect(pooled.sampleSd).toBeCloseTo(
      sampleStandardDeviation([...a, ...b]),
      12,
    );
    expect(pooled.n).toBe(7);
  });

  it('measures each object against its named backgrounds and warns about clipped regions', () => {
    const pixels = new Uint16Array(20 * 20).map((_, i) =>
      i % 20 < 10 ? 100 + (i % 3) : 200 + (i % 2),
    );
    const layout = resolveRegionLayout(
      parseRegionLayout({
        name: 'two halves',
        regions: [
          {
            name: 'left',
            role: 'object',
            spec: 'rect:0,0,10,20',
            background: ['right'],
          },
          { name: 'right', role: 'background', spec: 'rect:10,0,15,20' },
        ],
      }),
      null,
    );

    const result = measureLayout(pixels, 20, 20, layout, null, {
      cnrDefinition: 'background-sd',
      detrend: 'none',
    });

    expect(result.objects[0]!.figures.contrast.value).toBeCloseTo(
      (200.5 - 101) / 200.5,
      2,
    );
    expect(result.warnings.map((w) => w.code)).toEqual(['region_clipped']);
    expect(result.warnings[0]!.message).toContain("'right'");
  });
});
