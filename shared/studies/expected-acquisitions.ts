import type {
  Arm,
  BeamQuality,
  FilterLayer,
  StudyPlan,
} from '../schemas/study.schema.ts';

/**
 * One condition of a study: a beam quality through a phantom thickness, with
 * one grid under test. Each condition has two arms (grid and no grid).
 */
export interface PlannedCondition {
  /** Stable identity within a study; kept when the plan is edited. */
  key: string;
  /** Order in the checklist, from 1. */
  position: number;
  kvp: number;
  addedFiltration: FilterLayer[];
  hvlMmAl: number | null;
  phantomThicknessCm: number;
  gridId: number;
}

/** The exposure setting of one planned acquisition. */
export type PlannedExposure =
  { mode: 'manual'; exposureMas: number } | { mode: 'aec'; chamber: string };

/** One exposure the resident makes in the room. */
export interface ExpectedAcquisition {
  /** Order in the checklist, from 1. */
  step: number;
  conditionKey: string;
  kvp: number;
  addedFiltration: FilterLayer[];
  phantomThicknessCm: number;
  gridId: number;
  arm: Arm;
  /** 1…replicates. */
  replicate: number;
  exposure: PlannedExposure;
  sidCm: number;
  fieldWidthCm: number;
  fieldHeightCm: number;
}

/** Beyond this, a plan is not one session's work (common practice). */
export const MAX_EXPECTED_ACQUISITIONS = 400;

/** Plain text for a filtration, e.g. "0.1 mm Cu + 1 mm Al" or "none". */
export function describeFiltration(layers: FilterLayer[]): string {
  if (layers.length === 0) return 'none';
  return layers.map((l) => `${l.thicknessMm} mm ${l.material}`).join(' + ');
}

/** The identity of a condition: kV, filtration, thickness and grid. */
export function conditionKey(
  beam: Pick<BeamQuality, 'kvp' | 'addedFiltration'>,
  phantomThicknessCm: number,
  gridId: number,
): string {
  const filtration = beam.addedFiltration
    .map((l) => `${l.material}${l.thicknessMm}`)
    .join('+');
  return `kv${beam.kvp}|f${filtration || '0'}|t${phantomThicknessCm}|g${gridId}`;
}

/**
 * The conditions a plan defines: every phantom thickness × grid under test ×
 * beam quality, in the checklist's order (thickness outermost, because
 * re-stacking the phantom is the slowest change in the room; then the grid).
 * @param plan a parsed study plan.
 * @param gridIds the grids under test, in the order the study lists them.
 * @returns the conditions, positions from 1.
 */
export function conditionsFromPlan(
  plan: StudyPlan,
  gridIds: readonly number[],
): PlannedCondition[] {
  const conditions: PlannedCondition[] = [];
  for (const phantomThicknessCm of plan.phantom.thicknessesCm) {
    for (const gridId of gridIds) {
      for (const beam of plan.beamQualities) {
        conditions.push({
          key: conditionKey(beam, phantomThicknessCm, gridId),
          position: conditions.length + 1,
          kvp: beam.kvp,
          addedFiltration: beam.addedFiltration,
          hvlMmAl: beam.hvlMmAl,
          phantomThicknessCm,
          gridId,
        });
      }
    }
  }
  return conditions;
}

/** Number of exposures a plan asks for: conditions × 2 arms × replicates. */
export function expectedAcquisitionCount(
  plan: StudyPlan,
  gridCount: number,
): number {
  return (
    plan.phantom.thicknessesCm.length *
    gridCount *
    plan.beamQualities.length *
    2 *
    plan.replicates
  );
}

function exposureFor(plan: StudyPlan, arm: Arm): PlannedExposure {
  const e = plan.exposure;
  if (e.mode === 'aec') return { mode: 'aec', chamber: e.chamber };
  return {
    mode: 'manual',
    exposureMas: arm === 'grid' ? e.gridExposureMas : e.noGridExposureMas,
  };
}

/**
 * The list of exposures to make: per thickness and grid, first every beam
 * quality with the grid in (all replicates), then the same with the grid out,
 * so the grid is moved twice per thickness rather than once per exposure.
 * @param plan a parsed study plan.
 * @param gridIds the grids under test.
 * @returns conditions × 2 arms × replicates acquisitions, steps from 1.
 */
export function expectedAcquisitions(
  plan: StudyPlan,
  gridIds: readonly number[],
): ExpectedAcquisition[] {
  const list: ExpectedAcquisition[] = [];
  const conditions = conditionsFromPlan(plan, gridIds);
  for (const phantomThicknessCm of plan.phantom.thicknessesCm) {
    for (const gridId of gridIds) {
      const block = conditions.filter(
        (c) =>
          c.gridId === gridId && c.phantomThicknessCm === phantomThicknessCm,
      );
      for (const arm of ['grid', 'no_grid'] as const) {
        for (const c of block) {
          for (let replicate = 1; replicate <= plan.replicates; replicate++) {
            list.push({
              step: list.length + 1,
              conditionKey: c.key,
              kvp: c.kvp,
              addedFiltration: c.addedFiltration,
              phantomThicknessCm,
              gridId,
              arm,
              replicate,
              exposure: exposureFor(plan, arm),
              sidCm: plan.geometry.sidCm,
              fieldWidthCm: plan.geometry.fieldWidthCm,
              fieldHeightCm: plan.geometry.fieldHeightCm,
            });
          }
        }
      }
    }
  }
  return list;
}
