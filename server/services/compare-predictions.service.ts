import {
  predictTransmissions,
  predictedWithSpr,
  type PredictionOutcome,
} from '../../shared/compare/predicted-figures.ts';
import { filtrationKey } from '../../shared/compare/tolerance.ts';
import { DomainError } from '../../shared/errors.ts';
import type { PredictedForConditionDto } from '../../shared/schemas/compare.schema.ts';
import type { FilterLayer } from '../../shared/schemas/study.schema.ts';
import type { BoardConditionRow, BoardGrid } from './compare-board.service.ts';

// Predicted figures for the board's conditions, kept in memory per grid
// construction and beam, since each prediction integrates over a spectrum.

const PREDICTION_CACHE_LIMIT = 500;
const predictionCache = new Map<string, PredictionOutcome>();

function predictionKey(
  grid: BoardGrid,
  kvp: number,
  layers: FilterLayer[],
): string {
  return JSON.stringify([
    grid.ratio,
    grid.stripFrequencyPerCm,
    grid.stripHeightUm,
    grid.interspaceWidthUm,
    grid.stripThicknessUm,
    grid.stripMaterial,
    grid.interspaceMaterial,
    kvp,
    filtrationKey(layers),
  ]);
}

/**
 * Tp, Ts and Σ predicted from each listed condition's grid construction at
 * its beam quality, and K, B, SIF with the condition's measured SPR; null
 * where the grid's construction or interspace is not recorded. Predictions
 * are remembered per construction and beam (they take ~20 ms each).
 * @returns predictions by condition id.
 */
export function predictionsFor(
  conditions: readonly BoardConditionRow[],
  grids: ReadonlyMap<number, BoardGrid>,
): Map<number, PredictedForConditionDto> {
  const predicted = new Map<number, PredictedForConditionDto>();
  for (const condition of conditions) {
    const grid = grids.get(condition.gridId);
    if (!grid) continue;
    const key = predictionKey(grid, condition.kvp, condition.addedFiltration);
    let outcome = predictionCache.get(key);
    if (!outcome) {
      try {
        outcome = predictTransmissions(
          grid,
          condition.kvp,
          condition.addedFiltration,
        );
      } catch (error) {
        if (!(error instanceof DomainError)) throw error;
        outcome = { available: false, reason: error.message };
      }
      if (predictionCache.size >= PREDICTION_CACHE_LIMIT)
        predictionCache.clear();
      predictionCache.set(key, outcome);
    }
    if (!outcome.available) continue;
    const spr = condition.figures.scatter_to_primary_ratio?.value;
    const { prediction } = outcome;
    predicted.set(condition.conditionId, {
      primaryTransmission: prediction.primaryTransmission,
      scatterTransmission: prediction.scatterTransmission,
      selectivity: prediction.selectivity,
      withMeasuredSpr:
        spr !== undefined && spr >= 0
          ? { scatterToPrimaryRatio: spr, ...predictedWithSpr(prediction, spr) }
          : null,
      assumptions: prediction.assumptions,
    });
  }
  return predicted;
}
