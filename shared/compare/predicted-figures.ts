import { DomainError } from '../errors.ts';
import type { MaterialId } from '../physics/attenuation.ts';
import {
  completeGridConstruction,
  type GridConstruction,
} from '../physics/grid-construction.ts';
import { gridFiguresFromComponents } from '../physics/grid-figures.ts';
import { predictGridTransmissions } from '../physics/predicted-transmission.ts';
import type { BeamFilter } from '../physics/x-ray-spectrum.ts';
import {
  KRAMERS_MODEL_NAME,
  kramersSpectrum,
} from '../physics/x-ray-spectrum.ts';
import type { FilterLayer } from '../schemas/study.schema.ts';

/**
 * Predicted grid figures beside measured ones: Tp and Ts of the grid's
 * construction for a Kramers spectrum at the condition's kV (shared/physics/
 * predicted-transmission.ts), and K, B, SIF for the SPR measured in the
 * condition (beam stop) when there is one.
 * @see PHYSICS.md §2 and §6; Day & Dance, Phys Med Biol 1983;28:1429.
 */

/**
 * Filtration assumed in the tube before the added filters: 2.5 mm Al, the
 * least total filtration IEC 60601-1-3 asks of radiographic tubes (from
 * memory); real tubes often have more.
 */
export const ASSUMED_INHERENT_FILTRATION_MM_AL = 2.5;

// Coarser than the library defaults (1 keV bins, 96 × 64 directions) so a
// board can show a dozen predictions at once; on a 12:1, 40 lines/cm grid
// at 60–120 kV the results agree with the defaults within 0.5 %.
const SPECTRUM_BIN_KEV = 4;
const SCATTER_QUADRATURE = { polarSteps: 32, azimuthSteps: 16 };

const FILTER_MATERIALS: Record<FilterLayer['material'], MaterialId> = {
  Al: 'aluminium',
  Cu: 'copper',
};

/** The grid facts a prediction needs (as kept in the grid register). */
export interface GridForPrediction {
  ratio: number | null;
  stripFrequencyPerCm: number | null;
  stripHeightUm: number | null;
  interspaceWidthUm: number | null;
  stripThicknessUm: number | null;
  stripMaterial: MaterialId | null;
  interspaceMaterial: MaterialId | null;
}

/** Tp and Ts predicted for one grid and beam. */
export interface PredictedTransmissions {
  primaryTransmission: number;
  scatterTransmission: number;
  selectivity: number;
  /** The model and every assumption, in words. */
  assumptions: string;
}

/** A prediction, or the reason there is none. */
export type PredictionOutcome =
  | { available: true; prediction: PredictedTransmissions }
  | { available: false; reason: string };

const defined = (value: number | null): number | undefined =>
  value === null ? undefined : value;

/**
 * Predicts Tp, Ts and Σ of a grid at a beam quality.
 * @param grid construction (µm, lines/cm) and materials.
 * @param kvp tube voltage, kV.
 * @param addedFiltration the condition's added filters, in mm.
 * @returns the prediction, or why there is none (construction incomplete,
 *   interspace material unknown).
 * @throws DomainError for a tube voltage the spectrum model cannot take.
 */
export function predictTransmissions(
  grid: GridForPrediction,
  kvp: number,
  addedFiltration: readonly FilterLayer[],
): PredictionOutcome {
  if (!grid.interspaceMaterial) {
    return {
      available: false,
      reason: 'The interspace material of the grid is not recorded.',
    };
  }
  let construction: GridConstruction;
  try {
    construction = completeGridConstruction({
      ratio: defined(grid.ratio),
      stripFrequencyPerCm: defined(grid.stripFrequencyPerCm),
      stripHeightUm: defined(grid.stripHeightUm),
      interspaceWidthUm: defined(grid.interspaceWidthUm),
      stripThicknessUm: defined(grid.stripThicknessUm),
    });
  } catch (error) {
    if (!(error instanceof DomainError)) throw error;
    return { available: false, reason: error.message };
  }
  const filters: BeamFilter[] = [
    { material: 'aluminium', thicknessMm: ASSUMED_INHERENT_FILTRATION_MM_AL },
    ...addedFiltration.map((layer) => ({
      material: FILTER_MATERIALS[layer.material],
      thicknessMm: layer.thicknessMm,
    })),
  ];
  const prediction = predictGridTransmissions(
    {
      construction,
      stripMaterial: grid.stripMaterial ?? undefined,
      interspaceMaterial: grid.interspaceMaterial,
    },
    { spectrum: kramersSpectrum(kvp, filters, SPECTRUM_BIN_KEV) },
    { scatterToPrimaryRatio: 1, scatter: SCATTER_QUADRATURE },
  );
  return {
    available: true,
    prediction: {
      primaryTransmission: prediction.primaryTransmission,
      scatterTransmission: prediction.scatterTransmission,
      selectivity: prediction.figures.selectivity,
      assumptions: `${KRAMERS_MODEL_NAME} at ${kvp} kV with ${ASSUMED_INHERENT_FILTRATION_MM_AL} mm Al assumed inherent filtration plus the added filters; ${prediction.assumptions.weighting}-weighted; ${prediction.assumptions.stripMaterial} strips, ${prediction.assumptions.interspaceMaterial} interspace, cover plates ignored; scatter: ${prediction.assumptions.scatterModel}.`,
    },
  };
}

/** K, B, SIF and Tt implied by predicted Tp, Ts and a measured SPR. */
export interface PredictedWithSpr {
  totalTransmission: number;
  contrastImprovementFactor: number;
  buckyFactor: number;
  snrImprovementFactor: number;
}

/**
 * Completes a prediction with the SPR measured without the grid:
 * Tt = (Tp + SPR·Ts)/(1+SPR), K = Tp/Tt, B = 1/Tt, SIF = Tp/√Tt.
 * @throws DomainError('analysis_failed') for a negative SPR.
 * @see PHYSICS.md §2 derived relations.
 */
export function predictedWithSpr(
  prediction: PredictedTransmissions,
  scatterToPrimaryRatio: number,
): PredictedWithSpr {
  const figures = gridFiguresFromComponents(
    prediction.primaryTransmission,
    prediction.scatterTransmission,
    scatterToPrimaryRatio,
  );
  return {
    totalTransmission: figures.totalTransmission,
    contrastImprovementFactor: figures.contrastImprovementFactor,
    buckyFactor: figures.buckyFactor,
    snrImprovementFactor: figures.snrImprovementFactor,
  };
}
