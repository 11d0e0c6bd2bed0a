import type { Arm } from '../schemas/study.schema.ts';

/**
 * Reading single header facts for pairing: which planned value an image's
 * kV or phantom thickness stands for, and what its Grid attribute says.
 */

/** The header facts pairing reads from one image; null when absent. */
export interface PairingImage {
  imageId: number;
  /** KVP (0018,0060), kV. */
  kvp: number | null;
  /** Exposure, mAs (0018,1152 or 0018,1153). */
  exposureMas: number | null;
  /** Grid (0018,1166) values, e.g. ['FOCUSED', 'RECIPROCATING'] or ['NONE']. */
  grid: string[] | null;
  /** Grid ID (0018,1006). */
  gridId: string | null;
  /** Grid ratio from Grid Aspect Ratio (0018,7046), e.g. 12 for "12\1". */
  gridRatio: number | null;
  /** Body Part Thickness (0018,11A0), mm. */
  bodyPartThicknessMm: number | null;
  /** Station Name (0008,1010). */
  stationName: string | null;
  /** ISO 8601 acquisition date-time. */
  acquisitionDateTime: string | null;
}

/** A grid under test, as pairing matches it to Grid ID and ratio. */
export interface PairingGrid {
  id: number;
  label: string;
  serialNumber: string | null;
  ratio: number | null;
}

/** Grid (0018,1166) values that mean a grid was in the beam (DICOM PS3.3). */
const GRID_IN_VALUES = new Set([
  'FIXED',
  'FOCUSED',
  'RECIPROCATING',
  'PARALLEL',
  'CROSSED',
]);

/** What the Grid attribute says about the arm. */
export type GridReading =
  | { arm: Arm; text: string }
  | { arm: null; text: string; contradictory: boolean };

/** Reads the Grid attribute (absent, NONE, a grid type, or contradictory). */
export function readGridAttribute(values: string[] | null): GridReading {
  const clean = (values ?? [])
    .map((v) => v.trim().toUpperCase())
    .filter(Boolean);
  if (clean.length === 0) {
    return { arm: null, text: 'no Grid attribute', contradictory: false };
  }
  const joined = clean.join('\\');
  const hasNone = clean.includes('NONE');
  const hasGrid = clean.some((v) => GRID_IN_VALUES.has(v));
  if (hasNone && hasGrid) {
    return { arm: null, text: `Grid says ${joined}`, contradictory: true };
  }
  if (hasNone) return { arm: 'no_grid', text: 'Grid is NONE' };
  if (hasGrid) return { arm: 'grid', text: `Grid is ${joined}` };
  return { arm: null, text: `Grid says ${joined}`, contradictory: true };
}

/** Result of matching a measured value to the planned values. */
export interface NearestMatch {
  /** The nearest planned value within tolerance, or null. */
  value: number | null;
  /** Every planned value within tolerance (two or more means doubtful). */
  withinTolerance: number[];
}

/**
 * The planned value nearest to `measured` among those within tolerance.
 * @param measured the header value, in the planned values' unit.
 * @param planned the distinct planned values.
 * @param tolerance a function giving the allowed difference for a planned value.
 */
export function nearestPlanned(
  measured: number,
  planned: readonly number[],
  tolerance: (plannedValue: number) => number,
): NearestMatch {
  const within = planned
    .filter((p) => Math.abs(p - measured) <= tolerance(p))
    .sort((a, b) => Math.abs(a - measured) - Math.abs(b - measured));
  return { value: within[0] ?? null, withinTolerance: within };
}

/**
 * kV tolerance: 5 % of the planned value but at least 2 kV (common practice:
 * generator kV accuracy is checked to about ±5 %, and headers round kV).
 */
export const kvTolerance = (plannedKvp: number): number =>
  Math.max(2, 0.05 * plannedKvp);

/**
 * Phantom thickness tolerance: 1 cm or 5 %, whichever is larger (common
 * practice: slabs are 1 cm steps and Body Part Thickness is typed by hand).
 */
export const thicknessToleranceCm = (plannedCm: number): number =>
  Math.max(1, 0.05 * plannedCm);

/**
 * The grid under test an image's Grid ID or grid ratio points to, or null
 * when the header does not single one out.
 */
export function identifyGrid(
  image: Pick<PairingImage, 'gridId' | 'gridRatio'>,
  grids: readonly PairingGrid[],
): { grid: PairingGrid; how: string } | null {
  const id = image.gridId?.trim().toLowerCase();
  if (id) {
    const byId = grids.filter(
      (g) =>
        g.label.trim().toLowerCase() === id ||
        g.serialNumber?.trim().toLowerCase() === id,
    );
    if (byId.length === 1) {
      return { grid: byId[0]!, how: `Grid ID ${image.gridId}` };
    }
  }
  if (image.gridRatio !== null) {
    const byRatio = grids.filter((g) => g.ratio === image.gridRatio);
    if (byRatio.length === 1) {
      return { grid: byRatio[0]!, how: `grid ratio ${image.gridRatio}:1` };
    }
  }
  return null;
}

/** A number for a reason sentence: at most one decimal. */
export const formatValue = (value: number): string =>
  String(Math.round(value * 10) / 10);

/** Milliseconds since the epoch, or null for a missing or bad date-time. */
export function timeOf(
  image: Pick<PairingImage, 'acquisitionDateTime'>,
): number | null {
  if (!image.acquisitionDateTime) return null;
  const t = Date.parse(image.acquisitionDateTime);
  return Number.isFinite(t) ? t : null;
}
