import { Op } from 'sequelize';
import type { GridVerdictOutcome } from '../../../../shared/analysis/verdict.ts';
import { ConditionAnalysis } from '../../../models/condition-analysis.model.ts';
import { ConditionFigure } from '../../../models/condition-figure.model.ts';
import { StudyCondition } from '../../../models/study-condition.model.ts';

/**
 * The figures of a computed demo study, and the sentences its invented
 * reviewers write from them, so a comment never contradicts the results
 * beside it.
 */

/** The headline figures of one computed condition. */
export interface ConditionSummary {
  kvp: number;
  thicknessCm: number;
  contrastImprovementFactor: number;
  snrImprovementFactor: number;
  buckyFactor: number;
  outcome: GridVerdictOutcome | null;
}

/** The study's computed conditions, in checklist order. */
export async function summariseDemoResults(
  studyId: number,
): Promise<ConditionSummary[]> {
  const conditions = await StudyCondition.findAll({
    where: { studyId },
    order: [['position', 'ASC']],
  });
  const analyses = await ConditionAnalysis.findAll({ where: { studyId } });
  const figures = await ConditionFigure.findAll({
    where: {
      studyId,
      figure: {
        [Op.in]: [
          'contrast_improvement_factor',
          'snr_improvement_factor',
          'bucky_factor',
        ],
      },
    },
  });
  const value = (conditionId: number, key: string) =>
    figures.find((f) => f.conditionId === conditionId && f.figure === key)
      ?.value ?? Number.NaN;
  return conditions.map((c) => ({
    kvp: c.kvp,
    thicknessCm: c.phantomThicknessCm,
    contrastImprovementFactor: value(c.id, 'contrast_improvement_factor'),
    snrImprovementFactor: value(c.id, 'snr_improvement_factor'),
    buckyFactor: value(c.id, 'bucky_factor'),
    outcome:
      analyses.find((a) => a.conditionId === c.id)?.verdictOutcome ?? null,
  }));
}

/** "1.31–1.45" (or one value when they agree at this precision). */
export function span(values: number[], digits = 2): string {
  const low = Math.min(...values).toFixed(digits);
  const high = Math.max(...values).toFixed(digits);
  return low === high ? low : `${low}–${high}`;
}

const unique = (values: number[]) => [...new Set(values)].sort((a, b) => a - b);

/** "20–25 cm PMMA and 81–120 kV" for the conditions given. */
export function describeConditions(list: ConditionSummary[]): string {
  const cm = unique(list.map((c) => c.thicknessCm));
  const kv = unique(list.map((c) => c.kvp));
  const join = (v: number[]) =>
    v.length === 1 ? `${v[0]}` : `${v[0]}–${v[v.length - 1]}`;
  return `${join(cm)} cm PMMA and ${join(kv)} kV`;
}

/** What the verdicts of these conditions say together, in words. */
export function verdictPhrase(list: ConditionSummary[]): string {
  const outcomes = new Set(list.map((c) => c.outcome));
  if (outcomes.size === 1 && outcomes.has('benefit')) {
    return 'improves CNR at equal dose in every condition';
  }
  if (outcomes.size === 1 && outcomes.has('cost')) {
    return 'costs SNR at equal dose in every condition';
  }
  if (outcomes.size === 1 && outcomes.has('no-measurable-benefit')) {
    return 'shows no measurable benefit at equal dose';
  }
  if (!outcomes.has('benefit')) {
    return 'shows no benefit at equal dose (no measurable benefit or a cost)';
  }
  const n = list.filter((c) => c.outcome === 'benefit').length;
  return `improves CNR at equal dose in ${n} of ${list.length} conditions`;
}

/** The headline figures of these conditions as one clause. */
export function figuresClause(list: ConditionSummary[]): string {
  return `SIF ${span(list.map((c) => c.snrImprovementFactor))}, CIF ${span(list.map((c) => c.contrastImprovementFactor))}, Bucky factor ${span(
    list.map((c) => c.buckyFactor),
    1,
  )}`;
}

/** The conditions at one phantom thickness. */
export const atThickness = (list: ConditionSummary[], cm: number) =>
  list.filter((c) => c.thicknessCm === cm);

/** True when every condition's verdict is a measurable benefit. */
export const allBenefit = (list: ConditionSummary[]) =>
  list.length > 0 && list.every((c) => c.outcome === 'benefit');
