import { describe, expect, it } from 'vitest';
import {
  formConditions,
  hasGrid,
} from '../../../server/analysis/condition-grouping.service.ts';
import { TEST_GRID, decodedPhantom, slabSpec } from './synthetic-images.ts';

async function image(
  seed: number,
  grid: boolean,
  exposureMas: number,
  attributes = {},
) {
  const decoded = await decodedPhantom(
    slabSpec({
      seed,
      exposureMas,
      grid: grid ? TEST_GRID : null,
      columns: 32,
      rows: 32,
      object: null,
    }),
    attributes,
  );
  return { ...decoded, label: `img-${seed}` };
}

describe('forming conditions from headers', () => {
  it('pairs every grid series with the no-grid series of the same station, kV and thickness', async () => {
    const images = await Promise.all([
      image(1, false, 10),
      image(2, false, 10),
      image(3, true, 10),
      image(4, true, 10),
      image(5, true, 25),
      image(6, true, 25),
    ]);

    const { conditions, unassigned } = formConditions(images);

    expect(unassigned).toEqual([]);
    expect(conditions).toHaveLength(2);
    expect(conditions.map((c) => c.grid.exposureMas)).toEqual([10, 25]);
    expect(conditions[0]!.noGrid.images.map((i) => i.label)).toEqual([
      'img-1',
      'img-2',
    ]);
    expect(conditions[1]!.grid.images.map((i) => i.label)).toEqual([
      'img-5',
      'img-6',
    ]);
    expect(conditions[0]!.key).toEqual({
      stationName: 'SGH-TEST',
      kvp: 81,
      bodyPartThicknessMm: 200,
    });
  });

  it('keeps different kV, stations and thicknesses apart, and reports lonely images', async () => {
    const images = await Promise.all([
      image(1, false, 10),
      image(2, true, 10),
      image(3, true, 10, { KVP: 102 }),
      image(4, false, 10, { StationName: 'SGH-DR9' }),
      image(5, true, 10, { BodyPartThickness: 100 }),
    ]);

    const { conditions, unassigned } = formConditions(images);

    expect(conditions).toHaveLength(1);
    expect(conditions[0]!.grid.images.map((i) => i.label)).toEqual(['img-2']);
    expect(unassigned.map((u) => u.label).sort()).toEqual([
      'img-3',
      'img-4',
      'img-5',
    ]);
  });

  it('leaves out images without a Grid attribute, saying why', async () => {
    const a = await image(1, false, 10);
    const b = await image(2, true, 10);
    const noAttribute = { ...(await image(3, true, 10)), label: 'unknown' };
    noAttribute.acquisition = { ...noAttribute.acquisition, grid: null };

    const { conditions, unassigned } = formConditions([a, b, noAttribute]);

    expect(conditions).toHaveLength(1);
    expect(unassigned).toEqual([
      { label: 'unknown', reason: expect.stringContaining('Grid attribute') },
    ]);
    expect(hasGrid(noAttribute.acquisition)).toBeNull();
    expect(hasGrid(a.acquisition)).toBe(false);
    expect(hasGrid(b.acquisition)).toBe(true);
  });
});
