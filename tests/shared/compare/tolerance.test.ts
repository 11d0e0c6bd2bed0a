import { describe, expect, it } from 'vitest';
import {
  DEFAULT_TOLERANCE_PERCENT,
  conditionMatchKey,
  filtrationKey,
  flagAgainstBaseline,
  toleranceBand,
  toleranceFlag,
} from '../../../shared/compare/tolerance.ts';
import { DomainError } from '../../../shared/errors.ts';

describe('toleranceBand', () => {
  it('is baseline ± |baseline| · tolerance/100', () => {
    // By hand: 1.20 ± 0.12.
    const band = toleranceBand(1.2, 10);
    expect(band.low).toBeCloseTo(1.08, 12);
    expect(band.high).toBeCloseTo(1.32, 12);
  });

  it('keeps the band the right way round for a negative baseline', () => {
    // Dose saving can be negative: −0.2 ± 0.02.
    const band = toleranceBand(-0.2, 10);
    expect(band.low).toBeCloseTo(-0.22, 12);
    expect(band.high).toBeCloseTo(-0.18, 12);
  });

  it.each([
    [Number.NaN, 10],
    [1, -1],
    [1, 101],
    [Infinity, 10],
  ])('refuses baseline %s with tolerance %s %%', (value, tolerance) => {
    expect(() => toleranceBand(value, tolerance)).toThrow(DomainError);
  });
});

describe('toleranceFlag', () => {
  it('fires just outside the band and not just inside it', () => {
    expect(toleranceFlag('bucky_factor', 1.3201, 1.2, 10).status).toBe(
      'outside',
    );
    expect(toleranceFlag('bucky_factor', 1.3199, 1.2, 10).status).toBe(
      'within',
    );
    expect(toleranceFlag('bucky_factor', 1.0799, 1.2, 10).status).toBe(
      'outside',
    );
    expect(toleranceFlag('bucky_factor', 1.0801, 1.2, 10).status).toBe(
      'within',
    );
  });

  it('counts a value exactly on the edge as within', () => {
    expect(toleranceFlag('bucky_factor', 1.32, 1.2, 10).status).toBe('within');
    expect(toleranceFlag('bucky_factor', 2.2, 2, 10).status).toBe('within');
  });

  it('reports the deviation in % of the baseline', () => {
    const flag = toleranceFlag('snr_improvement_factor', 1.15, 1.25, 5);
    expect(flag.deviationPercent).toBeCloseTo(-8, 10);
    expect(flag.status).toBe('outside');
  });

  it('flags any change from a zero baseline and gives no percentage', () => {
    const flag = toleranceFlag('dose_saving', 0.01, 0, 10);
    expect(flag.status).toBe('outside');
    expect(flag.deviationPercent).toBeNull();
    expect(toleranceFlag('dose_saving', 0, 0, 10).status).toBe('within');
  });

  it('refuses a non-finite measured value', () => {
    expect(() => toleranceFlag('bucky_factor', Number.NaN, 1, 10)).toThrow(
      DomainError,
    );
  });
});

describe('flagAgainstBaseline', () => {
  it('checks the figures both sides have, with the default tolerance where none is set', () => {
    const flags = flagAgainstBaseline(
      {
        bucky_factor: { value: 3.35 },
        snr_improvement_factor: { value: 1.2 },
        contrast_improvement_factor: { value: 2 },
      },
      {
        figures: {
          bucky_factor: { value: 3 },
          snr_improvement_factor: { value: 1.25 },
          selectivity: { value: 7 },
        },
        tolerances: { snr_improvement_factor: 2 },
      },
    );
    expect(flags.map((f) => [f.figure, f.status, f.tolerancePercent])).toEqual([
      ['bucky_factor', 'outside', DEFAULT_TOLERANCE_PERCENT],
      ['snr_improvement_factor', 'outside', 2],
    ]);
  });
});

describe('filtrationKey and conditionMatchKey', () => {
  it('does not depend on the order the filter layers were listed in', () => {
    const a = filtrationKey([
      { material: 'Cu', thicknessMm: 0.1 },
      { material: 'Al', thicknessMm: 1 },
    ]);
    const b = filtrationKey([
      { material: 'Al', thicknessMm: 1 },
      { material: 'Cu', thicknessMm: 0.1 },
    ]);
    expect(a).toBe(b);
    expect(filtrationKey([])).toBe('none');
  });

  it('tells conditions apart by room, grid, kV, filtration and thickness', () => {
    const base = {
      roomId: 1,
      gridId: 2,
      kvp: 81,
      phantomThicknessCm: 20,
      addedFiltration: [],
    };
    const keys = new Set([
      conditionMatchKey(base),
      conditionMatchKey({ ...base, roomId: 3 }),
      conditionMatchKey({ ...base, gridId: 3 }),
      conditionMatchKey({ ...base, kvp: 90 }),
      conditionMatchKey({ ...base, phantomThicknessCm: 25 }),
      conditionMatchKey({
        ...base,
        addedFiltration: [{ material: 'Cu', thicknessMm: 0.1 }],
      }),
    ]);
    expect(keys.size).toBe(6);
  });
});
