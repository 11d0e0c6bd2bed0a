import { DomainError } from '../errors.ts';
import { TABLE_RANGE_KEV } from './attenuation-data.ts';
import { linearAttenuationPerCm, type MaterialId } from './attenuation.ts';
import type { SpectrumBin } from './predicted-transmission.ts';

/**
 * Beam spectra for predicted transmissions: a user's spectrum file, or a
 * rough filtered Kramers continuum.
 *
 * Kramers' law for a thick target gives the photon fluence per unit energy
 * Φ(E) ∝ Z·(E0 − E)/E below the tube voltage E0. Only its shape matters
 * here, so it has no coefficient to source. It has no characteristic lines
 * and no self-filtration in the anode, so spectra from it are a first
 * approximation only; supply a measured or modelled spectrum for anything
 * better.
 *
 * @see H. A. Kramers, Phil Mag 1923;46:836–871.
 */

/** A filter in the beam. */
export interface BeamFilter {
  material: MaterialId;
  thicknessMm: number;
  /** g/cm³; the material's default when omitted. */
  densityGPerCm3?: number;
}

/** Name to print beside any result computed from {@link kramersSpectrum}. */
export const KRAMERS_MODEL_NAME =
  'Kramers (1923) thick-target continuum, filtered; no characteristic lines';

/**
 * Filtered Kramers spectrum in bins of equal width, with photon fluence
 * Φ(E)·ΔE ∝ (E0 − E)/E · exp(−Σ μ_f(E)·x_f) at each bin centre.
 * @param tubeVoltageKv tube voltage E0, kV (up to 200).
 * @param filters filtration, each thickness in mm (e.g. 2.5 mm aluminium).
 * @param binWidthKeV bin width, keV (default 1).
 * @returns bins from the first centre at or above 1 keV up to E0, fluence
 *   normalised to a largest bin of 1.
 * @throws DomainError('validation_failed') for a voltage outside 2–200 kV, a
 *   negative filter thickness or a bin width not in (0, E0/2].
 * @see H. A. Kramers, Phil Mag 1923;46:836; NIST SRD 126 for the filters.
 */
export function kramersSpectrum(
  tubeVoltageKv: number,
  filters: BeamFilter[],
  binWidthKeV = 1,
): SpectrumBin[] {
  if (!(tubeVoltageKv >= 2 && tubeVoltageKv <= TABLE_RANGE_KEV.max)) {
    throw new DomainError(
      'validation_failed',
      `Tube voltage must be 2–${TABLE_RANGE_KEV.max} kV, got ${tubeVoltageKv}.`,
    );
  }
  if (!(binWidthKeV > 0 && binWidthKeV <= tubeVoltageKv / 2)) {
    throw new DomainError(
      'validation_failed',
      `Bin width must be positive and at most half the tube voltage, got ${binWidthKeV} keV.`,
    );
  }
  for (const filter of filters) {
    if (!(filter.thicknessMm >= 0) || !Number.isFinite(filter.thicknessMm)) {
      throw new DomainError(
        'validation_failed',
        `Filter thickness must be a non-negative number of mm, got ${filter.thicknessMm}.`,
      );
    }
  }
  const bins: SpectrumBin[] = [];
  for (
    let energyKeV = binWidthKeV / 2;
    energyKeV < tubeVoltageKv;
    energyKeV += binWidthKeV
  ) {
    if (energyKeV < TABLE_RANGE_KEV.min) continue;
    const filterExponent = filters.reduce(
      (sum, filter) =>
        sum +
        linearAttenuationPerCm(
          filter.material,
          energyKeV,
          filter.densityGPerCm3,
        ) *
          (filter.thicknessMm / 10),
      0,
    );
    bins.push({
      energyKeV,
      fluence:
        ((tubeVoltageKv - energyKeV) / energyKeV) * Math.exp(-filterExponent),
    });
  }
  const largest = Math.max(...bins.map((bin) => bin.fluence));
  if (!(largest > 0)) {
    throw new DomainError(
      'validation_failed',
      'The filtration stops every photon of this spectrum.',
    );
  }
  return bins.map((bin) => ({ ...bin, fluence: bin.fluence / largest }));
}

/**
 * Reads a spectrum file: one `energy_keV,fluence` pair per line; blank lines,
 * lines starting with `#` and a header line without numbers are skipped.
 * @param text file contents.
 * @returns bins in file order.
 * @throws DomainError('validation_failed') naming the first bad line, or when
 *   no bins are found.
 */
export function parseSpectrumCsv(text: string): SpectrumBin[] {
  const bins: SpectrumBin[] = [];
  let isFirstContentLine = true;
  text.split(/\r?\n/).forEach((rawLine, index) => {
    const line = rawLine.trim();
    if (line === '' || line.startsWith('#')) return;
    const fields = line.split(/[,;\t]/).map((field) => field.trim());
    const [energyKeV, fluence] = fields.map(Number);
    const isNumeric =
      fields.length >= 2 &&
      fields[0] !== '' &&
      fields[1] !== '' &&
      Number.isFinite(energyKeV) &&
      Number.isFinite(fluence);
    const isHeader = !isNumeric && isFirstContentLine;
    isFirstContentLine = false;
    if (isHeader) return;
    if (!isNumeric) {
      throw new DomainError(
        'validation_failed',
        `Spectrum line ${index + 1} is not "energy_keV,fluence": ${line}`,
      );
    }
    bins.push({ energyKeV: energyKeV!, fluence: fluence! });
  });
  if (bins.length === 0) {
    throw new DomainError(
      'validation_failed',
      'The spectrum file has no "energy_keV,fluence" lines.',
    );
  }
  return bins;
}
