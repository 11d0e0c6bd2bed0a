import { describe, expect, it } from 'vitest';
import {
  GRID_CONVERSION_TABLE_NAME,
  convertExposureBetweenGrids,
  gridConversionFactor,
} from '../../../shared/physics/grid-conversion.ts';

describe('film-era grid conversion (legacy comparison)', () => {
  it('turns 40 mAs with a 12:1 grid into 24 mAs with a 6:1 grid', () => {
    // Bushong's table as quoted in PHYSICS.md §8: worked example.
    expect(convertExposureBetweenGrids(40, 12, 6)).toBeCloseTo(24, 10);
  });

  it.each([
    [0, 1],
    [5, 2],
    [6, 3],
    [8, 4],
    [10, 5],
    [12, 5],
    [16, 6],
  ])('gives factor %d:1 → %d from the table', (ratio, factor) => {
    // Bushong, Radiologic Science for Technologists, as quoted in PHYSICS.md §8.
    expect(gridConversionFactor(ratio)).toBe(factor);
  });

  it('names its table and refuses ratios it does not list', () => {
    expect(GRID_CONVERSION_TABLE_NAME).toContain('Bushong');
    expect(() => gridConversionFactor(7)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => convertExposureBetweenGrids(-1, 12, 6)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
  });
});
