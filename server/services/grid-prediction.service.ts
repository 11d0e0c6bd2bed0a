import { Op } from 'sequelize';
import { DomainError } from '../../shared/errors.ts';
import {
  materialInfo,
  type MaterialId,
} from '../../shared/physics/attenuation.ts';
import {
  completeGridConstruction,
  type GridConstructionInput,
} from '../../shared/physics/grid-construction.ts';
import {
  predictGridTransmissions,
  type Beam,
  type CoverPlate,
  type GridBuild,
} from '../../shared/physics/predicted-transmission.ts';
import {
  KRAMERS_MODEL_NAME,
  kramersSpectrum,
  parseSpectrumCsv,
  type BeamFilter,
} from '../../shared/physics/x-ray-spectrum.ts';
import {
  DEFAULT_FILTRATION_SOURCE,
  DEFAULT_TOTAL_FILTRATION_MM_AL,
  type BeamRequest,
  type ConditionPredictionDto,
  type PredictedBeamDto,
  type PredictedFiguresDto,
} from '../../shared/schemas/geometry-api.schema.ts';
import type {
  FilterLayer,
  PhantomMaterial,
} from '../../shared/schemas/study.schema.ts';
import { describeCondition } from '../../shared/studies/condition-label.ts';
import type { Warning } from '../../shared/warnings.ts';
import { Grid } from '../models/grid.model.ts';
import { StudyCondition } from '../models/study-condition.model.ts';
import type { Study } from '../models/study.model.ts';

/**
 * Predicted transmissions and grid figures for register grids and study
 * conditions, from construction, NIST attenuation data and a beam. The
 * results and compare pages call {@link predictForCondition} (or
 * {@link tryPredictForCondition}) to show predicted figures beside measured
 * ones; the SPR is always the caller's assumption and travels with the
 * answer.
 *
 * @see PHYSICS.md §2 and §6; Day & Dance, Phys Med Biol 1983;28:1429;
 *   Kramers, Phil Mag 1923;46:836.
 */

/** The register fields a prediction reads (a Grid row or a GridDto). */
export type RegisterGridFacts = Pick<
  Grid,
  | 'id'
  | 'label'
  | 'ratio'
  | 'stripFrequencyPerCm'
  | 'stripHeightUm'
  | 'interspaceWidthUm'
  | 'stripThicknessUm'
  | 'stripMaterial'
  | 'interspaceMaterial'
  | 'coverMaterial'
>;

/** A beam ready for the physics, with how it is described to the user. */
export interface ResolvedBeam {
  beam: Beam;
  description: PredictedBeamDto;
}

/** Study filter materials as attenuation material ids. */
const FILTER_MATERIAL_IDS: Record<FilterLayer['material'], MaterialId> = {
  Al: 'aluminium',
  Cu: 'copper',
};

const PHANTOM_MATERIAL_IDS: Record<PhantomMaterial, MaterialId> = {
  pmma: 'pmma',
  water: 'water',
  aluminium: 'aluminium',
};

/**
 * What stops a register grid from being predicted, in words, or null when
 * nothing does: fewer than three construction values, or no interspace
 * material.
 * @param grid register fields of the grid.
 */
export function predictionUnavailableReason(
  grid: RegisterGridFacts,
): string | null {
  const missing: string[] = [];
  try {
    completeGridConstruction(constructionInput(grid));
  } catch (error) {
    if (!(error instanceof DomainError)) throw error;
    missing.push(error.message);
  }
  if (grid.interspaceMaterial === null) {
    missing.push('The register does not name its interspace material.');
  }
  return missing.length === 0
    ? null
    : `Grid ${grid.label} cannot be predicted: ${missing.join(' ')}`;
}

function constructionInput(grid: RegisterGridFacts): GridConstructionInput {
  const input: GridConstructionInput = {};
  for (const key of [
    'ratio',
    'stripFrequencyPerCm',
    'stripHeightUm',
    'interspaceWidthUm',
    'stripThicknessUm',
  ] as const) {
    const value = grid[key];
    if (value !== null) input[key] = value;
  }
  return input;
}

/**
 * The grid build of a register grid: its construction (completed from the
 * stored values), strip material (lead when the register names none) and
 * interspace material, plus the cover plates given.
 * @param grid register fields of the grid.
 * @param coverPlates plates to include (the register holds no thicknesses).
 * @returns the build, and a `cover_not_included` warning when the register
 *   names a cover material but no plate was given.
 * @throws DomainError('validation_failed') when the construction or the
 *   interspace material is not in the register.
 * @see IAEA Diagnostic Radiology Physics (2014) §6.3.4.
 */
export function gridBuildFromRegister(
  grid: RegisterGridFacts,
  coverPlates: CoverPlate[] = [],
): { build: GridBuild; warnings: Warning[] } {
  const reason = predictionUnavailableReason(grid);
  if (reason !== null) throw new DomainError('validation_failed', reason);
  const warnings: Warning[] = [];
  if (grid.coverMaterial !== null && coverPlates.length === 0) {
    warnings.push({
      code: 'cover_not_included',
      message: `The register names ${materialInfo(grid.coverMaterial).name} cover plates but not their thickness, so they are left out; Tp and Ts are somewhat over-estimated.`,
    });
  }
  return {
    build: {
      construction: completeGridConstruction(constructionInput(grid)),
      stripMaterial: grid.stripMaterial ?? 'lead',
      interspaceMaterial: grid.interspaceMaterial!,
      coverPlates,
    },
    warnings,
  };
}

function describeFilters(filters: BeamFilter[]): string {
  return filters
    .filter((f) => f.thicknessMm > 0)
    .map((f) => `${f.thicknessMm} mm ${materialInfo(f.material).name}`)
    .join(' + ');
}

function kramersBeam(
  kvp: number,
  filters: BeamFilter[],
  weighting: 'photons' | 'energy',
  filtrationText: string,
): ResolvedBeam {
  const spectrum = kramersSpectrum(kvp, filters);
  return {
    beam: { spectrum, weighting },
    description: {
      description: `${kvp} kV, ${filtrationText}; ${KRAMERS_MODEL_NAME}; ${weighting}-weighted`,
      spectrumModel: KRAMERS_MODEL_NAME,
      binCount: spectrum.length,
    },
  };
}

/**
 * Turns a request's beam into a physics beam: a single energy, a filtered
 * Kramers spectrum, or a user's `energy_keV,fluence` file.
 * @param request the beam part of a transmission request.
 * @throws DomainError('validation_failed') for a spectrum file that does not
 *   parse or a filtration that stops every photon.
 * @see Kramers, Phil Mag 1923;46:836.
 */
export function resolveBeam(request: BeamRequest): ResolvedBeam {
  if (request.kind === 'energy') {
    return {
      beam: { energyKeV: request.energyKeV },
      description: {
        description: `${request.energyKeV} keV, single energy`,
        spectrumModel: null,
        binCount: 1,
      },
    };
  }
  if (request.kind === 'kramers') {
    const filters: BeamFilter[] = [
      { material: 'aluminium', thicknessMm: request.totalFiltrationMmAl },
    ];
    return kramersBeam(
      request.kvp,
      filters,
      request.weighting,
      `${request.totalFiltrationMmAl} mm Al total filtration`,
    );
  }
  const spectrum = parseSpectrumCsv(request.spectrumCsv);
  const source = `spectrum file${request.fileName ? ` ${request.fileName}` : ''}`;
  return {
    beam: { spectrum, weighting: request.weighting },
    description: {
      description: `${source} (${spectrum.length} lines); ${request.weighting}-weighted`,
      spectrumModel: source,
      binCount: spectrum.length,
    },
  };
}

/** Input of {@link predictFigures}. */
export interface PredictFiguresInput {
  build: GridBuild;
  beam: ResolvedBeam;
  /** SPR without the grid, assumed by the caller (≥ 0). */
  scatterToPrimaryRatio: number;
  /** Largest scatter angle of the scatter model, degrees (default 90). */
  maxScatterAngleDeg?: number;
  grid?: { id: number; label: string } | null;
  /** Warnings found while building the input, shown with the result. */
  warnings?: Warning[];
}

/**
 * Predicts Tp and Ts and the figures they imply for an assumed SPR.
 * @returns {@link PredictedFiguresDto}: transmissions, K, B, Σ, SIF, Q, Tt,
 *   the construction, the beam and every assumption in words.
 * @throws DomainError('validation_failed' | 'analysis_failed') from the
 *   physics for invalid input.
 * @see PHYSICS.md §2 and §6; Day & Dance, Phys Med Biol 1983;28:1429.
 */
export function predictFigures(
  input: PredictFiguresInput,
): PredictedFiguresDto {
  const prediction = predictGridTransmissions(input.build, input.beam.beam, {
    scatterToPrimaryRatio: input.scatterToPrimaryRatio,
    scatter: { maxAngleDeg: input.maxScatterAngleDeg },
  });
  return {
    ...prediction,
    grid: input.grid ? { id: input.grid.id, label: input.grid.label } : null,
    construction: input.build.construction,
    beam: input.beam.description,
    coverPlates: (input.build.coverPlates ?? []).map((plate) => ({
      material: materialInfo(plate.material).name,
      thicknessUm: plate.thicknessUm,
    })),
    warnings: [...(input.warnings ?? []), ...prediction.warnings],
  };
}

/** Input of {@link predictForGrid}. */
export interface GridBeamInput {
  grid: RegisterGridFacts;
  /** Tube voltage, kV. */
  kvp: number;
  /** Total filtration of the beam, mm Al (default 2.5, stated). */
  totalFiltrationMmAl?: number;
  /** SPR without the grid, assumed (≥ 0). */
  scatterToPrimaryRatio: number;
}

/**
 * Predicted figures of a register grid for a Kramers beam of the given kV
 * and aluminium filtration.
 * @throws DomainError('validation_failed') when the register lacks the
 *   construction or interspace material, or for an invalid beam.
 * @see PHYSICS.md §6; Kramers, Phil Mag 1923;46:836.
 */
export function predictForGrid(input: GridBeamInput): PredictedFiguresDto {
  const { build, warnings } = gridBuildFromRegister(input.grid);
  const filtrationMmAl =
    input.totalFiltrationMmAl ?? DEFAULT_TOTAL_FILTRATION_MM_AL;
  const filtrationText =
    input.totalFiltrationMmAl === undefined
      ? `${filtrationMmAl} mm Al total filtration (assumed: ${DEFAULT_FILTRATION_SOURCE})`
      : `${filtrationMmAl} mm Al total filtration`;
  return predictFigures({
    build,
    beam: kramersBeam(
      input.kvp,
      [{ material: 'aluminium', thicknessMm: filtrationMmAl }],
      'energy',
      filtrationText,
    ),
    scatterToPrimaryRatio: input.scatterToPrimaryRatio,
    grid: input.grid,
    warnings,
  });
}

/** Input of {@link predictForCondition}. */
export interface ConditionBeamInput {
  grid: RegisterGridFacts;
  /** Tube voltage of the condition, kV. */
  kvp: number;
  /** The condition's added filtration (Al or Cu layers, mm). */
  addedFiltration: FilterLayer[];
  /**
   * The tube's own total filtration before the added layers, mm Al
   * (default 2.5, stated as assumed).
   */
  tubeFiltrationMmAl?: number;
  /** The phantom the primary crosses before the grid, if any. */
  phantom?: { material: PhantomMaterial; thicknessCm: number };
  /** SPR without the grid, assumed (≥ 0). */
  scatterToPrimaryRatio: number;
}

/**
 * Predicted figures for one study condition: a Kramers spectrum of the
 * condition's kV through the tube's filtration, the added layers and the
 * phantom (the primary reaching the grid is hardened by it; the scatter
 * model takes the same spectrum for scatter).
 * @param input grid, kV, added filtration (mm), phantom (cm), assumed SPR.
 * @returns {@link PredictedFiguresDto}.
 * @throws DomainError('validation_failed') when the register lacks the
 *   construction or interspace material, or the filtration and phantom stop
 *   every photon.
 * @see PHYSICS.md §6; Kramers, Phil Mag 1923;46:836; NIST SRD 126.
 */
export function predictForCondition(
  input: ConditionBeamInput,
): PredictedFiguresDto {
  const { build, warnings } = gridBuildFromRegister(input.grid);
  const tubeMmAl = input.tubeFiltrationMmAl ?? DEFAULT_TOTAL_FILTRATION_MM_AL;
  const filters: BeamFilter[] = [
    { material: 'aluminium', thicknessMm: tubeMmAl },
    ...input.addedFiltration.map((layer) => ({
      material: FILTER_MATERIAL_IDS[layer.material],
      thicknessMm: layer.thicknessMm,
    })),
  ];
  const added = describeFilters(filters.slice(1));
  const parts = [
    `${tubeMmAl} mm Al tube filtration${input.tubeFiltrationMmAl === undefined ? ` (assumed: ${DEFAULT_FILTRATION_SOURCE})` : ''}`,
    added === '' ? 'no added filtration' : `${added} added`,
  ];
  if (input.phantom) {
    filters.push({
      material: PHANTOM_MATERIAL_IDS[input.phantom.material],
      thicknessMm: input.phantom.thicknessCm * 10,
    });
    parts.push(
      `hardened by ${input.phantom.thicknessCm} cm ${materialInfo(PHANTOM_MATERIAL_IDS[input.phantom.material]).name}`,
    );
  }
  return predictFigures({
    build,
    beam: kramersBeam(input.kvp, filters, 'energy', parts.join(', ')),
    scatterToPrimaryRatio: input.scatterToPrimaryRatio,
    grid: input.grid,
    warnings,
  });
}

/**
 * Like {@link predictForCondition}, but answers why not instead of throwing
 * when the register or the beam does not allow a prediction.
 * @returns the prediction, or null with the reason in words.
 */
export function tryPredictForCondition(input: ConditionBeamInput): {
  prediction: PredictedFiguresDto | null;
  unavailableReason: string | null;
} {
  try {
    return { prediction: predictForCondition(input), unavailableReason: null };
  } catch (error) {
    if (!(error instanceof DomainError)) throw error;
    return { prediction: null, unavailableReason: error.message };
  }
}

/**
 * Predicted figures for every condition of a study, in checklist order,
 * each through its own phantom thickness; conditions sharing grid, beam and
 * thickness are computed once.
 * @param study the study (its plan names the phantom material).
 * @param scatterToPrimaryRatio SPR without the grid, assumed (≥ 0).
 * @returns one entry per condition, with a reason where none is possible.
 */
export async function predictStudyConditions(
  study: Pick<Study, 'id' | 'plan'>,
  scatterToPrimaryRatio: number,
): Promise<ConditionPredictionDto[]> {
  const conditions = await StudyCondition.findAll({
    where: { studyId: study.id },
    order: [['position', 'ASC']],
  });
  const grids = await Grid.findAll({
    where: { id: { [Op.in]: conditions.map((c) => c.gridId) } },
  });
  const material = study.plan.phantom.material;
  const cache = new Map<string, ReturnType<typeof tryPredictForCondition>>();
  return conditions.map((condition) => {
    const grid = grids.find((g) => g.id === condition.gridId)!;
    const key = JSON.stringify([
      grid.id,
      condition.kvp,
      condition.addedFiltration,
      condition.phantomThicknessCm,
    ]);
    let result = cache.get(key);
    if (!result) {
      result = tryPredictForCondition({
        grid,
        kvp: condition.kvp,
        addedFiltration: condition.addedFiltration,
        phantom: { material, thicknessCm: condition.phantomThicknessCm },
        scatterToPrimaryRatio,
      });
      cache.set(key, result);
    }
    return {
      conditionId: condition.id,
      conditionLabel: describeCondition(condition, material, grid.label),
      gridId: grid.id,
      ...result,
    };
  });
}
