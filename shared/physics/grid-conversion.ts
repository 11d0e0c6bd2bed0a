import { DomainError } from '../errors.ts';

/**
 * Film-era grid conversion factors (GCF). A legacy comparison only: in digital
 * radiography these factors do not mean the dose must rise (Kawashima et al.,
 * JACMP 2023;24(9):e14081). Values differ between textbooks; always name the
 * table shown.
 * @see Bushong, Radiologic Science for Technologists (grid conversion table),
 *   as quoted in PHYSICS.md §8.
 */

/** Name of the table below, to print beside any converted value. */
export const GRID_CONVERSION_TABLE_NAME =
  'Bushong, Radiologic Science for Technologists (film-era grid conversion factors)';

/** Grid ratios the table covers, with their conversion factor. */
const BUSHONG_FACTORS: ReadonlyArray<{
  minRatio: number;
  maxRatio: number;
  factor: number;
}> = [
  { minRatio: 0, maxRatio: 0, factor: 1 },
  { minRatio: 5, maxRatio: 5, factor: 2 },
  { minRatio: 6, maxRatio: 6, factor: 3 },
  { minRatio: 8, maxRatio: 8, factor: 4 },
  { minRatio: 10, maxRatio: 12, factor: 5 },
  { minRatio: 16, maxRatio: 16, factor: 6 },
];

/**
 * Grid conversion factor for a grid ratio (0 for no grid).
 * @param gridRatio r = h/D; 0 means no grid.
 * @throws DomainError('analysis_failed') for a ratio the table does not list
 *   (the table is not interpolated).
 * @see Bushong, as quoted in PHYSICS.md §8.
 */
export function gridConversionFactor(gridRatio: number): number {
  const row = BUSHONG_FACTORS.find(
    (entry) => gridRatio >= entry.minRatio && gridRatio <= entry.maxRatio,
  );
  if (!row) {
    throw new DomainError(
      'analysis_failed',
      `The film-era table lists no factor for a ${gridRatio}:1 grid (it has none, 5, 6, 8, 10–12 and 16).`,
    );
  }
  return row.factor;
}

/**
 * Converts an exposure between grids with the film-era rule
 * mAs₂ = mAs₁ · GCF₂ / GCF₁.
 * @param exposureMas mAs used with the first grid.
 * @param fromRatio ratio of the first grid (0 = none).
 * @param toRatio ratio of the second grid (0 = none).
 * @returns the mAs the rule gives for the second grid.
 * @see Bushong, as quoted in PHYSICS.md §8.
 */
export function convertExposureBetweenGrids(
  exposureMas: number,
  fromRatio: number,
  toRatio: number,
): number {
  if (!(exposureMas >= 0) || !Number.isFinite(exposureMas)) {
    throw new DomainError(
      'analysis_failed',
      `Exposure must be a non-negative number of mAs, got ${exposureMas}.`,
    );
  }
  return (
    (exposureMas * gridConversionFactor(toRatio)) /
    gridConversionFactor(fromRatio)
  );
}
