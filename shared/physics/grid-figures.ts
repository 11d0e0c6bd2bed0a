import { DomainError } from '../errors.ts';

/**
 * Grid figures from transmissions (IEC 60627:2013 quantities).
 *
 * Tp, Ts and Tt are the transmissions of primary, scattered and total
 * radiation: the signal of that component with the grid divided by the signal
 * without it (dimensionless, 0 < T ≤ 1 for a real grid). SPR is the
 * scatter-to-primary ratio S/P without the grid.
 *
 * @see IEC 60627:2013 (JIS Z 4910) definitions; PHYSICS.md §2.
 */

function requirePositive(name: string, value: number): void {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new DomainError(
      'analysis_failed',
      `${name} must be a positive finite number, got ${value}.`,
    );
  }
}

function requireNonNegative(name: string, value: number): void {
  if (!(value >= 0) || !Number.isFinite(value)) {
    throw new DomainError(
      'analysis_failed',
      `${name} must be a non-negative finite number, got ${value}.`,
    );
  }
}

/**
 * Bucky factor B = 1 / Tt: how much the exposure must rise to keep the
 * detector signal when the grid is put in.
 * @throws DomainError('analysis_failed') when Tt is not positive.
 * @see IEC 60627:2013; PHYSICS.md §2.
 */
export function buckyFactor(totalTransmission: number): number {
  requirePositive('Total transmission', totalTransmission);
  return 1 / totalTransmission;
}

/**
 * Contrast improvement factor K = Tp / Tt.
 * @throws DomainError('analysis_failed') when a transmission is not positive.
 * @see IEC 60627:2013; PHYSICS.md §2.
 */
export function contrastImprovementFactor(
  primaryTransmission: number,
  totalTransmission: number,
): number {
  requirePositive('Primary transmission', primaryTransmission);
  requirePositive('Total transmission', totalTransmission);
  return primaryTransmission / totalTransmission;
}

/**
 * Selectivity Σ = Tp / Ts.
 * @throws DomainError('analysis_failed') when a transmission is not positive.
 * @see IEC 60627:2013; PHYSICS.md §2.
 */
export function selectivity(
  primaryTransmission: number,
  scatterTransmission: number,
): number {
  requirePositive('Primary transmission', primaryTransmission);
  requirePositive('Scatter transmission', scatterTransmission);
  return primaryTransmission / scatterTransmission;
}

/**
 * Image improvement factor Q = Tp² / Tt (added in IEC 60627:2013).
 * @throws DomainError('analysis_failed') when a transmission is not positive.
 * @see IEC 60627:2013; PHYSICS.md §2.
 */
export function imageImprovementFactor(
  primaryTransmission: number,
  totalTransmission: number,
): number {
  requirePositive('Primary transmission', primaryTransmission);
  requirePositive('Total transmission', totalTransmission);
  return (primaryTransmission * primaryTransmission) / totalTransmission;
}

/**
 * SNR improvement factor at equal dose SIF = Tp / √Tt = √Q, for a
 * quantum-limited detector.
 * @throws DomainError('analysis_failed') when a transmission is not positive.
 * @see Bor et al., J Med Phys 2016;41:21–28; Kawashima et al., JACMP
 *   2023;24(9):e14081; PHYSICS.md §2.
 */
export function snrImprovementFactorFromTransmissions(
  primaryTransmission: number,
  totalTransmission: number,
): number {
  requirePositive('Primary transmission', primaryTransmission);
  requirePositive('Total transmission', totalTransmission);
  return primaryTransmission / Math.sqrt(totalTransmission);
}

/**
 * Fraction of dose saved at equal SNR, 1 − 1/SIF² (negative when the grid
 * needs more dose for the same SNR).
 * @throws DomainError('analysis_failed') when SIF is not positive.
 * @see PHYSICS.md §2 (derived from SNR² ∝ dose).
 */
export function doseSavingAtEqualSnr(snrImprovementFactor: number): number {
  requirePositive('SNR improvement factor', snrImprovementFactor);
  return 1 - 1 / (snrImprovementFactor * snrImprovementFactor);
}

/**
 * Total transmission from its components, Tt = (Tp + SPR·Ts) / (1 + SPR).
 * @param scatterToPrimaryRatio S/P without the grid (≥ 0).
 * @throws DomainError('analysis_failed') for negative or non-finite input.
 * @see PHYSICS.md §2 (derived).
 */
export function totalTransmissionFromComponents(
  primaryTransmission: number,
  scatterTransmission: number,
  scatterToPrimaryRatio: number,
): number {
  requirePositive('Primary transmission', primaryTransmission);
  requireNonNegative('Scatter transmission', scatterTransmission);
  requireNonNegative('Scatter-to-primary ratio', scatterToPrimaryRatio);
  return (
    (primaryTransmission + scatterToPrimaryRatio * scatterTransmission) /
    (1 + scatterToPrimaryRatio)
  );
}

/**
 * Scatter-to-primary ratio without the grid from three transmissions,
 * SPR = (Tp − Tt) / (Tt − Ts).
 * @throws DomainError('analysis_failed') when Tt equals Ts.
 * @see PHYSICS.md §2 (derived).
 */
export function scatterToPrimaryFromTransmissions(
  primaryTransmission: number,
  totalTransmission: number,
  scatterTransmission: number,
): number {
  const denominator = totalTransmission - scatterTransmission;
  if (!(Math.abs(denominator) > 0)) {
    throw new DomainError(
      'analysis_failed',
      'Total and scatter transmission are equal, so the SPR is undefined.',
    );
  }
  return (primaryTransmission - totalTransmission) / denominator;
}

/**
 * Scatter fraction SF = SPR / (1 + SPR) = S / (P + S).
 * @throws DomainError('analysis_failed') for a negative SPR.
 * @see PHYSICS.md §2.
 */
export function scatterFraction(scatterToPrimaryRatio: number): number {
  requireNonNegative('Scatter-to-primary ratio', scatterToPrimaryRatio);
  return scatterToPrimaryRatio / (1 + scatterToPrimaryRatio);
}

/** Every grid figure implied by Tp, Ts and SPR. */
export interface GridFiguresFromComponents {
  totalTransmission: number;
  contrastImprovementFactor: number;
  buckyFactor: number;
  selectivity: number;
  snrImprovementFactor: number;
  imageImprovementFactor: number;
  doseSaving: number;
  /** SPR behind the grid, SPR / Σ. */
  scatterToPrimaryBehindGrid: number;
}

/**
 * Predicts every grid figure from the primary and scatter transmissions and
 * the SPR without the grid: Tt = (Tp + SPR·Ts)/(1+SPR), K = Tp/Tt, B = 1/Tt,
 * Σ = Tp/Ts, SIF = Tp/√Tt, Q = Tp²/Tt, dose saving 1 − 1/SIF², SPR/Σ.
 * @throws DomainError('analysis_failed') for non-positive Tp or Ts or a
 *   negative SPR.
 * @see IEC 60627:2013; PHYSICS.md §2 derived relations.
 */
export function gridFiguresFromComponents(
  primaryTransmission: number,
  scatterTransmission: number,
  scatterToPrimaryRatio: number,
): GridFiguresFromComponents {
  const tt = totalTransmissionFromComponents(
    primaryTransmission,
    scatterTransmission,
    scatterToPrimaryRatio,
  );
  const sigma = selectivity(primaryTransmission, scatterTransmission);
  const sif = snrImprovementFactorFromTransmissions(primaryTransmission, tt);
  return {
    totalTransmission: tt,
    contrastImprovementFactor: contrastImprovementFactor(
      primaryTransmission,
      tt,
    ),
    buckyFactor: buckyFactor(tt),
    selectivity: sigma,
    snrImprovementFactor: sif,
    imageImprovementFactor: imageImprovementFactor(primaryTransmission, tt),
    doseSaving: doseSavingAtEqualSnr(sif),
    scatterToPrimaryBehindGrid: scatterToPrimaryRatio / sigma,
  };
}
