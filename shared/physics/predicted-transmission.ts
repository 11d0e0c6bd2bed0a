import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import {
  linearAttenuationPerCm,
  materialInfo,
  type MaterialId,
} from './attenuation.ts';
import {
  gridRangeWarnings,
  type GridConstruction,
} from './grid-construction.ts';
import {
  gridFiguresFromComponents,
  type GridFiguresFromComponents,
} from './grid-figures.ts';

/**
 * Transmissions of a linear grid predicted from its construction.
 *
 * A photon crossing the grid at polar angle θ to the normal moves sideways,
 * across the strips, by Δ = h·tan θ·|cos ψ| (ψ its azimuth from the
 * across-strip direction) while travelling a path h·sec θ. Entering at a
 * lateral position x of the period, the share of that path inside strip
 * material is the strip length met along [x, x + Δ] divided by Δ. Its
 * transmission exp(−μ_i·L_i − μ_s·L_s) is averaged over x across one period
 * exactly (the strip share is piecewise linear in x), in the manner of Day &
 * Dance (1983). At θ = 0 this is the primary transmission
 * Tp = (D/P)·exp(−μ_i·h) + (t/P)·exp(−μ_s·h), P = D + t.
 * Cover plates multiply by exp(−Σ μ_c·x_c·sec θ).
 *
 * Scatter model (an assumption, stated with every result): scattered
 * photons arrive with isotropic radiance over the forward hemisphere up to a
 * largest angle (default 90°), are counted in proportion to the photon
 * current through the detector plane (weight cos θ), and have the same
 * spectrum as the primary beam (real scatter is softer, so Ts is somewhat
 * over-estimated). Focusing is ignored for scatter. Strips are taken as
 * straight and parallel across one period.
 *
 * @see Day & Dance, Phys Med Biol 1983;28:1429 (path-length integration over
 *   a grid period); PHYSICS.md §6 (primary formula, derived).
 */

/** A cover plate (front or back) crossed by every photon. */
export interface CoverPlate {
  material: MaterialId;
  thicknessUm: number;
  /** g/cm³; the material's default when omitted. */
  densityGPerCm3?: number;
}

/** Materials and geometry of a grid whose transmissions are predicted. */
export interface GridBuild {
  construction: GridConstruction;
  /** Strip material (default lead). */
  stripMaterial?: MaterialId;
  stripDensityGPerCm3?: number;
  interspaceMaterial: MaterialId;
  interspaceDensityGPerCm3?: number;
  /** Every cover plate, front and back, each listed once. */
  coverPlates?: CoverPlate[];
}

/** One line of a beam spectrum. */
export interface SpectrumBin {
  energyKeV: number;
  /** Photon fluence in this bin, any unit (only ratios matter). */
  fluence: number;
}

/**
 * How spectrum bins weigh the transmissions: by photon count (a counting
 * detector) or by photon count × energy (an energy-integrating detector).
 */
export type SpectrumWeighting = 'photons' | 'energy';

/** A single energy or a spectrum. */
export type Beam =
  | { energyKeV: number }
  | { spectrum: SpectrumBin[]; weighting?: SpectrumWeighting };

/** Options of the scatter model. */
export interface ScatterModelOptions {
  /** Largest scatter angle from the normal, degrees (default 90). */
  maxAngleDeg?: number;
  /** Quadrature points in θ (default 96) and in ψ over 0–90° (default 64). */
  polarSteps?: number;
  azimuthSteps?: number;
}

const UM_PER_CM = 10_000;

interface LinearCoefficients {
  stripPerCm: number;
  interspacePerCm: number;
  /** Σ μ_c·x_c of the cover plates at normal incidence (dimensionless). */
  coverAttenuation: number;
}

function coefficientsAt(
  grid: GridBuild,
  energyKeV: number,
): LinearCoefficients {
  const coverAttenuation = (grid.coverPlates ?? []).reduce((sum, plate) => {
    if (!(plate.thicknessUm >= 0) || !Number.isFinite(plate.thicknessUm)) {
      throw new DomainError(
        'validation_failed',
        `Cover plate thickness must be a non-negative number of µm, got ${plate.thicknessUm}.`,
      );
    }
    return (
      sum +
      (linearAttenuationPerCm(plate.material, energyKeV, plate.densityGPerCm3) *
        plate.thicknessUm) /
        UM_PER_CM
    );
  }, 0);
  return {
    stripPerCm: linearAttenuationPerCm(
      grid.stripMaterial ?? 'lead',
      energyKeV,
      grid.stripDensityGPerCm3,
    ),
    interspacePerCm: linearAttenuationPerCm(
      grid.interspaceMaterial,
      energyKeV,
      grid.interspaceDensityGPerCm3,
    ),
    coverAttenuation,
  };
}

/** Strip length met from 0 to u across the periodic pattern, µm. */
function stripLengthTo(u: number, periodUm: number, stripUm: number): number {
  const periods = Math.floor(u / periodUm);
  return periods * stripUm + Math.min(u - periods * periodUm, stripUm);
}

/**
 * Grid transmission for one direction, averaged over the entry position.
 * @param lateralUm sideways travel Δ across the strips, µm (≥ 0).
 * @param pathUm path length through the grid, µm.
 */
function transmissionForDirection(
  construction: GridConstruction,
  mu: LinearCoefficients,
  lateralUm: number,
  pathUm: number,
): number {
  const { periodUm: p, stripThicknessUm: t } = construction;
  const pathCm = pathUm / UM_PER_CM;
  const interspaceOnly = mu.interspacePerCm * pathCm;
  const extraPerStripShare = (mu.stripPerCm - mu.interspacePerCm) * pathCm;
  if (lateralUm < 1e-9 * p) {
    return (
      ((p - t) / p) * Math.exp(-interspaceOnly) +
      (t / p) * Math.exp(-interspaceOnly - extraPerStripShare)
    );
  }
  const breaks = [0, t, p, mod(-lateralUm, p), mod(t - lateralUm, p)].sort(
    (a, b) => a - b,
  );
  const exponentAt = (x: number): number => {
    const met = stripLengthTo(x + lateralUm, p, t) - stripLengthTo(x, p, t);
    return interspaceOnly + (extraPerStripShare * met) / lateralUm;
  };
  let integral = 0;
  for (let i = 0; i + 1 < breaks.length; i++) {
    const x0 = breaks[i]!;
    const x1 = breaks[i + 1]!;
    const width = x1 - x0;
    if (width <= 0) continue;
    const k0 = exponentAt(x0);
    const k1 = exponentAt(x1);
    const dk = k1 - k0;
    integral +=
      Math.abs(dk) < 1e-9
        ? width * Math.exp(-k0)
        : (width * (Math.exp(-k0) - Math.exp(-k1))) / dk;
  }
  return integral / p;
}

function mod(value: number, period: number): number {
  return ((value % period) + period) % period;
}

function requireConstruction(construction: GridConstruction): void {
  const { stripHeightUm, stripThicknessUm, interspaceWidthUm } = construction;
  for (const value of [stripHeightUm, stripThicknessUm, interspaceWidthUm]) {
    if (!(value > 0) || !Number.isFinite(value)) {
      throw new DomainError(
        'validation_failed',
        'Strip height, strip thickness and interspace width must be positive.',
      );
    }
  }
}

/**
 * Primary transmission at one energy,
 * Tp = [(D/P)·exp(−μ_i·h) + (t/P)·exp(−μ_s·h)]·exp(−Σ μ_c·x_c).
 * @param grid construction (µm) and materials.
 * @param energyKeV photon energy, 1–200 keV.
 * @throws DomainError('validation_failed') for an energy outside the tables
 *   or invalid construction.
 * @see PHYSICS.md §6 (derived); NIST SRD 126 attenuation data.
 */
export function primaryTransmissionAt(
  grid: GridBuild,
  energyKeV: number,
): number {
  requireConstruction(grid.construction);
  const mu = coefficientsAt(grid, energyKeV);
  return (
    transmissionForDirection(
      grid.construction,
      mu,
      0,
      grid.construction.stripHeightUm,
    ) * Math.exp(-mu.coverAttenuation)
  );
}

interface Direction {
  /** tan θ · |cos ψ|. */
  lateralSlope: number;
  secant: number;
  weight: number;
}

function scatterDirections(options: ScatterModelOptions): Direction[] {
  const maxAngleDeg = options.maxAngleDeg ?? 90;
  const polarSteps = options.polarSteps ?? 96;
  const azimuthSteps = options.azimuthSteps ?? 64;
  if (!(maxAngleDeg > 0 && maxAngleDeg <= 90)) {
    throw new DomainError(
      'validation_failed',
      `The largest scatter angle must be in (0, 90] degrees, got ${maxAngleDeg}.`,
    );
  }
  if (
    !Number.isInteger(polarSteps) ||
    !Number.isInteger(azimuthSteps) ||
    polarSteps < 8 ||
    azimuthSteps < 4
  ) {
    throw new DomainError(
      'validation_failed',
      'Scatter quadrature needs at least 8 polar and 4 azimuth steps.',
    );
  }
  const maxAngle = (maxAngleDeg * Math.PI) / 180;
  const directions: Direction[] = [];
  // θ = θmax·v² crowds points near the normal, where the grid's acceptance
  // (about 1/r) makes the transmission change fastest.
  for (let i = 0; i < polarSteps; i++) {
    const v = (i + 0.5) / polarSteps;
    const theta = maxAngle * v * v;
    const dTheta = 2 * maxAngle * v;
    const cosTheta = Math.cos(theta);
    if (cosTheta <= 0) continue;
    const polarWeight = cosTheta * Math.sin(theta) * dTheta;
    for (let j = 0; j < azimuthSteps; j++) {
      // ψ = (π/2)·(2w − w²) crowds points towards ψ = 90°, along the strips,
      // where the sideways travel vanishes and the transmission turns sharply.
      const w = (j + 0.5) / azimuthSteps;
      const psi = (Math.PI / 2) * (2 * w - w * w);
      directions.push({
        lateralSlope: Math.tan(theta) * Math.cos(psi),
        secant: 1 / cosTheta,
        weight: polarWeight * (1 - w),
      });
    }
  }
  return directions;
}

function scatterTransmissionWith(
  grid: GridBuild,
  energyKeV: number,
  directions: Direction[],
): number {
  const mu = coefficientsAt(grid, energyKeV);
  const heightUm = grid.construction.stripHeightUm;
  let transmitted = 0;
  let total = 0;
  for (const direction of directions) {
    const pathUm = heightUm * direction.secant;
    const cover = Math.exp(-mu.coverAttenuation * direction.secant);
    transmitted +=
      direction.weight *
      cover *
      transmissionForDirection(
        grid.construction,
        mu,
        heightUm * direction.lateralSlope,
        pathUm,
      );
    total += direction.weight;
  }
  return transmitted / total;
}

/**
 * Scatter transmission at one energy under the stated scatter model
 * (isotropic radiance over the forward hemisphere, cos θ detector weight,
 * path lengths integrated over a grid period).
 * @param grid construction (µm) and materials.
 * @param energyKeV photon energy, 1–200 keV.
 * @param options largest angle (degrees) and quadrature steps.
 * @throws DomainError('validation_failed') for invalid input.
 * @see Day & Dance, Phys Med Biol 1983;28:1429.
 */
export function scatterTransmissionAt(
  grid: GridBuild,
  energyKeV: number,
  options: ScatterModelOptions = {},
): number {
  requireConstruction(grid.construction);
  return scatterTransmissionWith(grid, energyKeV, scatterDirections(options));
}

/**
 * The scatter model in words, to print beside every predicted Ts.
 * @param options the options the prediction used (largest angle, degrees).
 * @see Day & Dance, Phys Med Biol 1983;28:1429.
 */
export function describeScatterModel(
  options: ScatterModelOptions = {},
): string {
  return `isotropic scatter radiance over the forward hemisphere up to ${options.maxAngleDeg ?? 90}°, detector weight cos θ, scatter spectrum equal to the primary's; path lengths integrated over a grid period (after Day & Dance 1983)`;
}

/** Options of {@link predictGridTransmissions}. */
export interface PredictionOptions {
  /** Scatter-to-primary ratio without the grid, assumed (≥ 0). */
  scatterToPrimaryRatio: number;
  scatter?: ScatterModelOptions;
}

/** Predicted transmissions and the figures they imply. */
export interface GridPrediction {
  primaryTransmission: number;
  scatterTransmission: number;
  /** K, B, Σ, SIF, Q, Tt … for the assumed SPR. */
  figures: GridFiguresFromComponents;
  assumptions: {
    scatterToPrimaryRatio: number;
    scatterModel: string;
    weighting: SpectrumWeighting | 'monoenergetic';
    stripMaterial: string;
    interspaceMaterial: string;
  };
  warnings: Warning[];
}

function checkSpectrum(spectrum: SpectrumBin[]): void {
  if (spectrum.length === 0) {
    throw new DomainError('validation_failed', 'The spectrum has no bins.');
  }
  for (const bin of spectrum) {
    if (!Number.isFinite(bin.energyKeV) || !(bin.fluence >= 0)) {
      throw new DomainError(
        'validation_failed',
        `Spectrum bins need a finite energy and a non-negative fluence (got ${bin.energyKeV} keV, ${bin.fluence}).`,
      );
    }
  }
  if (!spectrum.some((bin) => bin.fluence > 0)) {
    throw new DomainError(
      'validation_failed',
      'The spectrum has no fluence in any bin.',
    );
  }
}

/**
 * Predicts Tp and Ts of a grid for a beam and derives K, B, Σ, SIF and the
 * rest for an assumed SPR (Tt = (Tp + SPR·Ts)/(1 + SPR)). A spectrum is
 * treated as discrete lines; each transmission is the weighted mean over the
 * lines with weight fluence (photons) or fluence × energy (energy, the
 * default).
 * @param grid construction (µm) and materials.
 * @param beam a single energy (keV) or a spectrum of (keV, fluence) bins.
 * @param options assumed SPR and scatter-model options.
 * @returns {@link GridPrediction}, with the assumptions spelled out and
 *   `unusual_grid_value` warnings for ratio or frequency outside the usual
 *   ranges.
 * @throws DomainError('validation_failed') for energies outside 1–200 keV, an
 *   empty spectrum, a negative SPR or invalid construction.
 * @see PHYSICS.md §2 and §6; Day & Dance, Phys Med Biol 1983;28:1429.
 */
export function predictGridTransmissions(
  grid: GridBuild,
  beam: Beam,
  options: PredictionOptions,
): GridPrediction {
  requireConstruction(grid.construction);
  const directions = scatterDirections(options.scatter ?? {});
  const isSpectrum = 'spectrum' in beam;
  if (isSpectrum) checkSpectrum(beam.spectrum);
  const weighting = isSpectrum ? (beam.weighting ?? 'energy') : undefined;
  const lines = isSpectrum
    ? beam.spectrum.filter((bin) => bin.fluence > 0)
    : [{ energyKeV: beam.energyKeV, fluence: 1 }];
  let weightSum = 0;
  let primarySum = 0;
  let scatterSum = 0;
  for (const line of lines) {
    const weight =
      weighting === 'energy' ? line.fluence * line.energyKeV : line.fluence;
    primarySum += weight * primaryTransmissionAt(grid, line.energyKeV);
    scatterSum +=
      weight * scatterTransmissionWith(grid, line.energyKeV, directions);
    weightSum += weight;
  }
  const primaryTransmission = primarySum / weightSum;
  const scatterTransmission = scatterSum / weightSum;
  if (!(scatterTransmission > 0)) {
    throw new DomainError(
      'analysis_failed',
      'The predicted scatter transmission is zero, so the grid figures are undefined.',
    );
  }
  return {
    primaryTransmission,
    scatterTransmission,
    figures: gridFiguresFromComponents(
      primaryTransmission,
      scatterTransmission,
      options.scatterToPrimaryRatio,
    ),
    assumptions: {
      scatterToPrimaryRatio: options.scatterToPrimaryRatio,
      scatterModel: describeScatterModel(options.scatter),
      weighting: weighting ?? 'monoenergetic',
      stripMaterial: materialInfo(grid.stripMaterial ?? 'lead').name,
      interspaceMaterial: materialInfo(grid.interspaceMaterial).name,
    },
    warnings: gridRangeWarnings({
      ratio: grid.construction.ratio,
      stripFrequencyPerCm: grid.construction.stripFrequencyPerCm,
    }),
  };
}
