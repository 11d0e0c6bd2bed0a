import { describe, expect, it } from 'vitest';
import { parseRegionLayout } from '../../../shared/analysis/region-layout.ts';
import { DomainError } from '../../../shared/errors.ts';
import {
  findCircularObjects,
  proposeObjectRegions,
} from '../../../shared/roi/find-circular-objects.ts';
import { renderPhantomImage } from '../../../server/synthetic/phantom-image.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';

interface Shape {
  kind: 'disc' | 'square';
  cx: number;
  cy: number;
  /** Radius of a disc, half the side of a square. */
  size: number;
  factor: number;
}

/** Flat field with a heel ramp, shapes of known place and size, Gaussian noise. */
function scene(
  columns: number,
  rows: number,
  shapes: Shape[],
  seed = 1,
): Uint16Array {
  const random = createSeededRandom(seed);
  const out = new Uint16Array(columns * rows);
  for (let y = 0; y < rows; y += 1) {
    for (let x = 0; x < columns; x += 1) {
      let v = 3000 * (1 + 0.0005 * (x - columns / 2));
      for (const s of shapes) {
        const dx = x + 0.5 - s.cx;
        const dy = y + 0.5 - s.cy;
        const inside =
          s.kind === 'disc'
            ? dx * dx + dy * dy <= s.size * s.size
            : Math.abs(dx) <= s.size && Math.abs(dy) <= s.size;
        if (inside) v *= s.factor;
      }
      out[y * columns + x] = Math.round(v + 15 * random.normal());
    }
  }
  return out;
}

const near = (found: { cx: number; cy: number }, cx: number, cy: number) =>
  Math.hypot(found.cx - cx, found.cy - cy);

describe('findCircularObjects', () => {
  const shapes: Shape[] = [
    { kind: 'disc', cx: 64, cy: 80, size: 12, factor: 0.95 },
    { kind: 'disc', cx: 190, cy: 150, size: 20, factor: 0.97 },
    { kind: 'disc', cx: 120, cy: 200, size: 8, factor: 1.06 },
  ];
  const image = { columns: 260, rows: 250, pixels: scene(260, 250, shapes) };

  it('finds discs darker and brighter than their surround, with centre and radius', () => {
    const { objects } = findCircularObjects(image, {
      minRadiusPx: 5,
      maxRadiusPx: 40,
    });
    expect(objects).toHaveLength(3);
    for (const s of shapes) {
      const match = objects.find((o) => near(o, s.cx, s.cy) < 1);
      expect(match, `disc at ${s.cx},${s.cy}`).toBeDefined();
      expect(Math.abs(match!.radiusPx - s.size) / s.size).toBeLessThan(0.1);
      expect(match!.polarity).toBe(s.factor < 1 ? 'darker' : 'brighter');
      // Contrast by construction: 1 − factor of the local level.
      expect(match!.contrast).toBeCloseTo(1 - s.factor, 2);
    }
  });

  it('keeps to the polarity asked for', () => {
    const { objects } = findCircularObjects(image, {
      minRadiusPx: 5,
      maxRadiusPx: 40,
      polarity: 'darker',
    });
    expect(objects.map((o) => o.polarity)).toEqual(['darker', 'darker']);
  });

  it('leaves out a square of the same contrast and objects outside the radius limits', () => {
    const squares: Shape[] = [
      { kind: 'square', cx: 80, cy: 80, size: 15, factor: 0.9 },
      { kind: 'disc', cx: 180, cy: 160, size: 15, factor: 0.9 },
    ];
    const picture = {
      columns: 260,
      rows: 250,
      pixels: scene(260, 250, squares, 2),
    };
    const { objects } = findCircularObjects(picture, {
      minRadiusPx: 5,
      maxRadiusPx: 40,
    });
    expect(objects).toHaveLength(1);
    expect(near(objects[0]!, 180, 160)).toBeLessThan(1);
    const tooSmall = findCircularObjects(picture, {
      minRadiusPx: 20,
      maxRadiusPx: 40,
    });
    expect(tooSmall.objects).toHaveLength(0);
  });

  it('finds nothing in plain noise', () => {
    const noise = { columns: 200, rows: 200, pixels: scene(200, 200, [], 3) };
    expect(findCircularObjects(noise).objects).toHaveLength(0);
  });

  it('finds the contrast disc and the lead discs of a synthetic phantom image', () => {
    const pixels = renderPhantomImage({
      columns: 1400,
      rows: 1200,
      seed: 11,
      pixelSpacingMm: 0.2,
      exposureMas: 10,
      primaryKermaUgyPerMas: 0.5,
      scatterToPrimaryRatio: 1.5,
      grid: null,
      kermaPerQuantumUgy: 1e-5,
      object: { cx: 700, cy: 600, radiusPx: 80, primaryContrast: 0.1 },
      leadDiscs: [
        { cx: 300, cy: 300, diameterMm: 10 },
        { cx: 1100, cy: 900, diameterMm: 20 },
      ],
      heelGradientPerPx: 0.0001,
      response: { model: 'linear', offset: 100, gainPerUgy: 1000 },
    });
    const { objects, decimation } = findCircularObjects(
      { columns: 1400, rows: 1200, pixels },
      { minRadiusPx: 10, maxRadiusPx: 150 },
    );
    expect(decimation).toBeGreaterThan(1);
    // Known geometry of the generated image: disc r 80 px; lead discs of
    // 10 mm and 20 mm at 0.2 mm per pixel, radii 25 px and 50 px.
    for (const [cx, cy, r] of [
      [700, 600, 80],
      [300, 300, 25],
      [1100, 900, 50],
    ] as const) {
      const match = objects.find((o) => near(o, cx, cy) < 1.5);
      expect(match, `object at ${cx},${cy}`).toBeDefined();
      expect(Math.abs(match!.radiusPx - r)).toBeLessThan(0.08 * r);
    }
  });

  it('refuses radius limits that make no range', () => {
    expect(() =>
      findCircularObjects(image, { minRadiusPx: 10, maxRadiusPx: 5 }),
    ).toThrow(DomainError);
  });
});

describe('proposeObjectRegions', () => {
  it('proposes an inner circle and a ring per object that form a valid layout', () => {
    const { regions, warnings } = proposeObjectRegions([
      {
        cx: 50,
        cy: 50,
        radiusPx: 10,
        polarity: 'darker',
        contrast: 0.1,
        cnr: 5,
        circularity: 0.95,
      },
      {
        cx: 120,
        cy: 50,
        radiusPx: 10,
        polarity: 'darker',
        contrast: 0.1,
        cnr: 5,
        circularity: 0.95,
      },
    ]);
    expect(warnings).toEqual([]);
    expect(regions.slice(0, 2)).toEqual([
      {
        name: 'object 1',
        role: 'object',
        spec: 'circle:50,50,7',
        background: ['background 1'],
      },
      { name: 'background 1', role: 'background', spec: 'ring:50,50,15,25' },
    ]);
    expect(() => parseRegionLayout({ name: 'found', regions })).not.toThrow();
  });

  it('shrinks a ring that would reach a neighbour, and warns when too little is left', () => {
    const close = proposeObjectRegions([
      {
        cx: 50,
        cy: 50,
        radiusPx: 10,
        polarity: 'darker',
        contrast: 0.1,
        cnr: 5,
        circularity: 1,
      },
      {
        cx: 80,
        cy: 50,
        radiusPx: 5,
        polarity: 'darker',
        contrast: 0.1,
        cnr: 5,
        circularity: 1,
      },
    ]);
    // 30 px apart, neighbour radius 5 → ring ends at 30 − 1.2·5 = 24 px.
    expect(close.regions[1]!.spec).toBe('ring:50,50,15,24');
    const crowded = proposeObjectRegions([
      {
        cx: 50,
        cy: 50,
        radiusPx: 10,
        polarity: 'darker',
        contrast: 0.1,
        cnr: 5,
        circularity: 1,
      },
      {
        cx: 68,
        cy: 50,
        radiusPx: 5,
        polarity: 'darker',
        contrast: 0.1,
        cnr: 5,
        circularity: 1,
      },
    ]);
    expect(crowded.warnings.map((w) => w.code)).toContain(
      'background_ring_crowded',
    );
  });
});
