import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import { gridRangeWarnings } from './grid-construction.ts';

/**
 * Primary cut-off of a focused linear grid and its focusing range, in the
 * small-angle strip geometry: a strip of height h whose direction differs
 * from the ray's by a small angle δ casts a shadow h·δ across an interspace
 * of width D, so the fraction of primary lost is r·|δ| (r = h/D), capped
 * at 1. The loss is relative to a perfectly aligned grid (the strips' own
 * share 1 − D/P is not included).
 *
 * Geometry (all in cm, across the strips): f0 focusing distance, f1 actual
 * focus–grid distance, b lateral offset of the focal spot from the grid's
 * centre line, c position of the image point from the centre line, α tilt of
 * the grid about an axis parallel to the strips. At c the strip leans by c/f0
 * (−c/f0 upside down) plus α, and the ray by (c − b)/f1, so
 * δ(c) = ±c/f0 + α − (c − b)/f1, which gives
 * L(c) = r·|c·(1/f0 − 1/f1) + b/f1 + α| the right way up and
 * L(c) = r·|c·(1/f0 + 1/f1) − b/f1 − α| upside down (≈ 2·r·c/f0 at f1 = f0).
 * The tilt term is first order in small angles: a tilt α acts like a lateral
 * offset b = α·f1 (derived here from the same geometry).
 *
 * @see PHYSICS.md §5 (formulas derived; they match textbook forms, from
 *   memory); IEC 60627 for the focusing-range criterion (from memory).
 */

/** Alignment of a focused grid in the beam. */
export interface FocusedGridGeometry {
  /** Grid ratio r = h/D. */
  ratio: number;
  /** Focusing distance f0, cm. */
  focusDistanceCm: number;
  /** Actual focal-spot-to-grid distance f1, cm. */
  sourceGridDistanceCm: number;
  /** Lateral offset b of the focal spot across the strips, cm (default 0). */
  lateralOffsetCm?: number;
  /** Tilt α about an axis parallel to the strips, degrees (default 0). */
  tiltDeg?: number;
  /** The grid is in the beam upside down (tube side facing the detector). */
  isUpsideDown?: boolean;
}

/**
 * Relative primary at the field edge that bounds the focusing range: 60 % of
 * the centred value (so the edge may lose 1 − 0.6 = 0.4). From memory of
 * IEC 60627; callers may pass another criterion.
 */
export const FOCUSING_RANGE_CRITERION = 0.6;

/** Where {@link FOCUSING_RANGE_CRITERION} comes from, for display. */
export const FOCUSING_RANGE_CRITERION_SOURCE = 'from memory of IEC 60627';

function requirePositive(label: string, value: number): void {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new DomainError(
      'validation_failed',
      `${label} must be a positive number, got ${value}.`,
    );
  }
}

function requireFinite(label: string, value: number): void {
  if (!Number.isFinite(value)) {
    throw new DomainError(
      'validation_failed',
      `${label} must be a finite number, got ${value}.`,
    );
  }
}

function checkGeometry(geometry: FocusedGridGeometry): void {
  requirePositive('Grid ratio', geometry.ratio);
  requirePositive('Focusing distance (cm)', geometry.focusDistanceCm);
  requirePositive('Focus–grid distance (cm)', geometry.sourceGridDistanceCm);
  requireFinite('Lateral offset (cm)', geometry.lateralOffsetCm ?? 0);
  requireFinite('Tilt (degrees)', geometry.tiltDeg ?? 0);
}

/**
 * Fraction of primary lost to cut-off at one point of a focused grid,
 * L(c) = r·|c·(1/f0 − 1/f1) + b/f1 + α| (upside down
 * r·|c·(1/f0 + 1/f1) − b/f1 − α|), capped at 1.
 * Special cases: lateral offset only, r·b/f0; distance only,
 * r·|c|·|1/f0 − 1/f1|; upside down at f1 = f0, 2·r·|c|/f0.
 * @param geometry ratio, distances (cm), offset (cm), tilt (degrees).
 * @param positionCm distance c of the image point from the centre line
 *   across the strips, cm (signed).
 * @returns loss fraction in [0, 1], relative to an aligned grid.
 * @throws DomainError('validation_failed') for a non-positive ratio or
 *   distance, or a non-finite offset, tilt or position.
 * @see PHYSICS.md §5 (derived small-angle strip geometry).
 */
export function primaryLossFraction(
  geometry: FocusedGridGeometry,
  positionCm: number,
): number {
  checkGeometry(geometry);
  requireFinite('Position (cm)', positionCm);
  const f0 = geometry.focusDistanceCm;
  const f1 = geometry.sourceGridDistanceCm;
  const b = geometry.lateralOffsetCm ?? 0;
  const alpha = ((geometry.tiltDeg ?? 0) * Math.PI) / 180;
  const stripLean = (geometry.isUpsideDown ? -positionCm : positionCm) / f0;
  const rayAngle = (positionCm - b) / f1;
  return Math.min(1, geometry.ratio * Math.abs(stripLean + alpha - rayAngle));
}

/** One point of a loss profile. */
export interface LossProfilePoint {
  /** Position c across the strips, cm. */
  positionCm: number;
  /** Fraction of primary lost, 0–1. */
  lossFraction: number;
  /** Primary relative to an aligned grid, 1 − loss. */
  relativePrimary: number;
}

/**
 * Loss across the field, at evenly spaced points from −w/2 to +w/2.
 * @param geometry see {@link FocusedGridGeometry}.
 * @param fieldWidthCm field width w across the strips at the grid, cm.
 * @param pointCount number of points (≥ 2, default 41).
 * @throws DomainError('validation_failed') for a non-positive width, fewer
 *   than two points, or invalid geometry.
 * @see PHYSICS.md §5.
 */
export function primaryLossProfile(
  geometry: FocusedGridGeometry,
  fieldWidthCm: number,
  pointCount = 41,
): LossProfilePoint[] {
  requirePositive('Field width (cm)', fieldWidthCm);
  if (!Number.isInteger(pointCount) || pointCount < 2) {
    throw new DomainError(
      'validation_failed',
      `A profile needs at least two points, got ${pointCount}.`,
    );
  }
  return Array.from({ length: pointCount }, (_, index) => {
    const positionCm = fieldWidthCm * (index / (pointCount - 1) - 0.5);
    const lossFraction = primaryLossFraction(geometry, positionCm);
    return { positionCm, lossFraction, relativePrimary: 1 - lossFraction };
  });
}

/** Focus–grid distances over which the field edge keeps enough primary. */
export interface FocusingRange {
  /** Nearest distance, cm: 1/f = 1/f0 + k/(r·c). */
  nearCm: number;
  /** Farthest distance, cm, or null when there is no far limit. */
  farCm: number | null;
  /** Relative edge primary that bounds the range (e.g. 0.6). */
  criterion: number;
  /** Where the criterion comes from. */
  criterionSource: string;
  /** Distance c from the centre line the range is for, cm. */
  edgePositionCm: number;
}

/**
 * Focusing range: the focus–grid distances at which primary at distance c
 * from the centre line stays at or above `criterion` of its aligned value,
 * 1/f = 1/f0 ± k/(r·c) with k = 1 − criterion. When k/(r·c) ≥ 1/f0 there is
 * no far limit (`farCm` null).
 * @param ratio grid ratio r.
 * @param focusDistanceCm focusing distance f0, cm.
 * @param edgePositionCm distance c of the field edge from the centre line,
 *   cm (half the field width across the strips).
 * @param criterion relative edge primary, 0 < criterion < 1 (default
 *   {@link FOCUSING_RANGE_CRITERION}).
 * @param criterionSource label shown beside the criterion.
 * @throws DomainError('validation_failed') for non-positive input or a
 *   criterion outside (0, 1).
 * @see PHYSICS.md §5 (derived from the distance-only loss; the 60 %
 *   criterion from memory of IEC 60627).
 */
export function focusingRange(
  ratio: number,
  focusDistanceCm: number,
  edgePositionCm: number,
  criterion: number = FOCUSING_RANGE_CRITERION,
  criterionSource: string = criterion === FOCUSING_RANGE_CRITERION
    ? FOCUSING_RANGE_CRITERION_SOURCE
    : 'chosen by the user',
): FocusingRange {
  requirePositive('Grid ratio', ratio);
  requirePositive('Focusing distance (cm)', focusDistanceCm);
  requirePositive('Field edge position (cm)', edgePositionCm);
  if (!(criterion > 0 && criterion < 1)) {
    throw new DomainError(
      'validation_failed',
      `The focusing-range criterion is a fraction between 0 and 1, got ${criterion}.`,
    );
  }
  const allowedAngle = (1 - criterion) / (ratio * edgePositionCm);
  const inverseFar = 1 / focusDistanceCm - allowedAngle;
  return {
    nearCm: 1 / (1 / focusDistanceCm + allowedAngle),
    farCm: inverseFar > 0 ? 1 / inverseFar : null,
    criterion,
    criterionSource,
    edgePositionCm,
  };
}

/**
 * Distance from the centre line beyond which an upside-down focused grid cuts
 * off all primary: |c| = 1 / (r·(1/f0 + 1/f1)), which is f0/(2r) at f1 = f0
 * (no offset or tilt).
 * @param ratio grid ratio r.
 * @param focusDistanceCm focusing distance f0, cm.
 * @param sourceGridDistanceCm focus–grid distance f1, cm (default f0).
 * @throws DomainError('validation_failed') for non-positive input.
 * @see PHYSICS.md §5 (derived).
 */
export function upsideDownTotalCutoffCm(
  ratio: number,
  focusDistanceCm: number,
  sourceGridDistanceCm: number = focusDistanceCm,
): number {
  requirePositive('Grid ratio', ratio);
  requirePositive('Focusing distance (cm)', focusDistanceCm);
  requirePositive('Focus–grid distance (cm)', sourceGridDistanceCm);
  return 1 / (ratio * (1 / focusDistanceCm + 1 / sourceGridDistanceCm));
}

/** Input of the geometry planner. */
export interface GeometryPlanInput extends FocusedGridGeometry {
  /** Field width across the strips at the grid, cm. */
  fieldWidthCm: number;
  /** Relative edge primary bounding the focusing range (default 0.6). */
  focusingCriterion?: number;
  /** Points in the loss profile (default 41). */
  profilePointCount?: number;
}

/** Everything the planner shows. */
export interface GeometryPlan {
  profile: LossProfilePoint[];
  /** The larger loss of the two field edges. */
  edgeLossFraction: number;
  /** Loss at the centre line (non-zero with an offset or tilt). */
  centreLossFraction: number;
  focusingRange: FocusingRange;
  /**
   * f1 lies inside the focusing range (the distance test only; offset, tilt
   * and an upside-down grid are reported by their own warnings).
   */
  isWithinFocusingRange: boolean;
  /** Upside down only: |c| beyond which cut-off is total, cm. */
  upsideDownTotalCutoffCm?: number;
  warnings: Warning[];
}

/**
 * Plans a focused-grid set-up: loss profile across the field, loss at the
 * field edge, focusing range for this field and a warning when the planned
 * distance is outside it, and for an upside-down grid the distance beyond
 * which cut-off is total.
 * @param input geometry (cm, degrees), field width (cm), criterion.
 * @returns {@link GeometryPlan} with warnings `outside_focusing_range`,
 *   `edge_loss_high`, `grid_upside_down`, `total_cutoff_in_field` and
 *   `unusual_grid_value`.
 * @throws DomainError('validation_failed') for invalid geometry.
 * @see PHYSICS.md §5.
 */
export function planFocusedGrid(input: GeometryPlanInput): GeometryPlan {
  const profile = primaryLossProfile(
    input,
    input.fieldWidthCm,
    input.profilePointCount,
  );
  const halfWidthCm = input.fieldWidthCm / 2;
  const edgeLossFraction = Math.max(
    primaryLossFraction(input, -halfWidthCm),
    primaryLossFraction(input, halfWidthCm),
  );
  const range = focusingRange(
    input.ratio,
    input.focusDistanceCm,
    halfWidthCm,
    input.focusingCriterion,
  );
  const f1 = input.sourceGridDistanceCm;
  const isWithinFocusingRange =
    f1 >= range.nearCm && (range.farCm === null || f1 <= range.farCm);
  const warnings: Warning[] = gridRangeWarnings({
    ratio: input.ratio,
    focusDistanceCm: input.focusDistanceCm,
  });
  if (!isWithinFocusingRange) {
    warnings.push({
      code: 'outside_focusing_range',
      message: `A focus–grid distance of ${f1} cm is outside the focusing range ${range.nearCm.toFixed(1)}–${range.farCm === null ? '∞' : range.farCm.toFixed(1)} cm for a ${input.fieldWidthCm} cm field (edge primary below ${Math.round(range.criterion * 100)} %).`,
    });
  }
  if (
    isWithinFocusingRange &&
    !input.isUpsideDown &&
    edgeLossFraction > 1 - range.criterion
  ) {
    warnings.push({
      code: 'edge_loss_high',
      message: `The field edge loses ${Math.round(edgeLossFraction * 100)} % of its primary through the offset or tilt, more than the ${Math.round((1 - range.criterion) * 100)} % the focusing-range criterion allows.`,
    });
  }
  const plan: GeometryPlan = {
    profile,
    edgeLossFraction,
    centreLossFraction: primaryLossFraction(input, 0),
    focusingRange: range,
    isWithinFocusingRange,
    warnings,
  };
  if (input.isUpsideDown) {
    const cutoffCm = upsideDownTotalCutoffCm(
      input.ratio,
      input.focusDistanceCm,
      f1,
    );
    plan.upsideDownTotalCutoffCm = cutoffCm;
    warnings.push({
      code: 'grid_upside_down',
      message: `The grid is upside down: primary falls off from the centre and is cut off completely beyond ${cutoffCm.toFixed(1)} cm from it.`,
    });
    if (cutoffCm < halfWidthCm) {
      warnings.push({
        code: 'total_cutoff_in_field',
        message: `Primary is cut off completely within the field (beyond ${cutoffCm.toFixed(1)} cm of the centre, field half-width ${halfWidthCm} cm).`,
      });
    }
  }
  return plan;
}
