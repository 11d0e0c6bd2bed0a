import {
  planFocusedGrid,
  type GeometryPlanInput,
} from '../../shared/physics/focused-grid.ts';
import { completeGridConstruction } from '../../shared/physics/grid-construction.ts';
import type { GridBuild } from '../../shared/physics/predicted-transmission.ts';
import type {
  GeometryPlanDto,
  PlanRequest,
  PredictedFiguresDto,
  TransmissionRequest,
} from '../../shared/schemas/geometry-api.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { AppError, validationFailed } from '../errors.ts';
import type { Grid } from '../models/grid.model.ts';
import {
  gridBuildFromRegister,
  predictFigures,
  resolveBeam,
} from './grid-prediction.service.ts';
import { findGridById } from './grid.service.ts';

/**
 * The focused-grid planner and predicted transmissions behind
 * `/api/geometry`, with the grid typed in or taken from the register. Both
 * are calculators: they read the register and write nothing.
 *
 * @see PHYSICS.md §5 (cut-off, focusing range) and §6 (transmissions).
 */

async function registerGrid(gridId: number): Promise<Grid> {
  try {
    return await findGridById(gridId);
  } catch (error) {
    if (!(error instanceof AppError && error.status === 404)) throw error;
    throw validationFailed(
      [
        {
          path: 'gridId',
          message: `There is no grid ${gridId} in the register.`,
        },
      ],
      'The grid is not in the register.',
    );
  }
}

/**
 * Plans a focused-grid set-up: loss profile, edge loss, focusing range,
 * out-of-range warning and, upside down, where cut-off becomes total.
 * @param request planner input; with `gridId` the ratio and focusing
 *   distance come from the register.
 * @returns {@link GeometryPlanDto} with the resolved input and the grid used.
 * @throws AppError 400 (details on `gridId`) when the register grid does not
 *   exist or lacks a ratio or focusing distance (a parallel grid);
 *   DomainError('validation_failed') for invalid geometry.
 * @see PHYSICS.md §5; focused-grid.ts.
 */
export async function planGeometry(
  request: PlanRequest,
): Promise<GeometryPlanDto> {
  const { gridId, ratio, focusDistanceCm, ...rest } = request;
  let grid: Grid | null = null;
  let resolved: Pick<GeometryPlanInput, 'ratio' | 'focusDistanceCm'>;
  if (gridId !== undefined) {
    grid = await registerGrid(gridId);
    const missing = [
      grid.ratio === null ? 'ratio' : null,
      grid.focusDistanceCm === null ? 'focusing distance' : null,
    ].filter((m) => m !== null);
    if (missing.length > 0) {
      throw validationFailed(
        [
          {
            path: 'gridId',
            message: `Grid ${grid.label} has no ${missing.join(' or ')} in the register${grid.focusDistanceCm === null ? ' (a parallel grid has no focusing distance)' : ''}.`,
          },
        ],
        'This grid cannot be planned.',
      );
    }
    resolved = { ratio: grid.ratio!, focusDistanceCm: grid.focusDistanceCm! };
  } else {
    // The schema requires both when no grid is named.
    resolved = { ratio: ratio!, focusDistanceCm: focusDistanceCm! };
  }
  const input: GeometryPlanInput = { ...rest, ...resolved };
  return {
    ...planFocusedGrid(input),
    input,
    grid: grid ? { id: grid.id, label: grid.label } : null,
  };
}

/**
 * Predicts Tp, Ts and K, B, Σ, SIF, Q for a typed or register grid and a
 * beam (single energy, Kramers spectrum or uploaded spectrum), for the SPR
 * the request assumes.
 * @param request construction or `gridId`, materials, cover plates, beam,
 *   assumed SPR and largest scatter angle.
 * @returns {@link PredictedFiguresDto} with every assumption stated.
 * @throws AppError 400 (details on `gridId`) for a grid not in the
 *   register; DomainError('validation_failed') for a construction that does
 *   not fix the grid, a register grid without construction or interspace
 *   material, or a spectrum file that does not parse.
 * @see PHYSICS.md §6; Day & Dance, Phys Med Biol 1983;28:1429.
 */
export async function predictTransmission(
  request: TransmissionRequest,
): Promise<PredictedFiguresDto> {
  let build: GridBuild;
  let warnings: Warning[] = [];
  let grid: Grid | null = null;
  if (request.gridId !== undefined) {
    grid = await registerGrid(request.gridId);
    ({ build, warnings } = gridBuildFromRegister(grid, request.coverPlates));
  } else {
    // The schema requires both when no grid is named.
    build = {
      construction: completeGridConstruction(request.construction!),
      stripMaterial: request.stripMaterial ?? 'lead',
      stripDensityGPerCm3: request.stripDensityGPerCm3,
      interspaceMaterial: request.interspaceMaterial!,
      interspaceDensityGPerCm3: request.interspaceDensityGPerCm3,
      coverPlates: request.coverPlates,
    };
  }
  if (grid && request.stripDensityGPerCm3 !== undefined) {
    build.stripDensityGPerCm3 = request.stripDensityGPerCm3;
  }
  if (grid && request.interspaceDensityGPerCm3 !== undefined) {
    build.interspaceDensityGPerCm3 = request.interspaceDensityGPerCm3;
  }
  return predictFigures({
    build,
    beam: resolveBeam(request.beam),
    scatterToPrimaryRatio: request.scatterToPrimaryRatio,
    maxScatterAngleDeg: request.maxScatterAngleDeg,
    grid,
    warnings,
  });
}
