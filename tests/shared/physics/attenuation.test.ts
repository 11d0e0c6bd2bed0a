import { beforeAll, describe, expect, it } from 'vitest';
import {
  MATERIAL_IDS,
  absorptionEdges,
  linearAttenuationPerCm,
  massAttenuationCm2PerG,
  massFractions,
  materialInfo,
  type MaterialId,
} from '../../../shared/physics/attenuation.ts';
import {
  ELEMENT_TABLES,
  TABLE_RANGE_KEV,
} from '../../../shared/physics/attenuation-data.ts';
import { DomainError } from '../../../shared/errors.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

type Reference = Record<string, number[]>;

const SCRIPT = 'xraylib_mass_attenuation.py';

/** xraylib CS_Total via tests/reference/xraylib_mass_attenuation.py. */
function xraylibValues(queries: Partial<Record<MaterialId, number[]>>) {
  return runReferenceScript<Reference>(SCRIPT, [], queries);
}

/** Deterministic uniform numbers (mulberry32) so a failure can be re-run. */
function seededUniform(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Random energies, log-uniform in 5–200 keV, at least 0.5 % away from every
 * edge of the material (xraylib and NIST place edges a few eV apart).
 */
function energiesBetweenEdges(id: MaterialId, count: number, seed: number) {
  const uniform = seededUniform(seed);
  const edges = absorptionEdges(id).map((edge) => edge.energyKeV);
  const energies: number[] = [];
  while (energies.length < count) {
    const energyKeV = 5 * Math.exp(uniform() * Math.log(200 / 5));
    if (edges.every((edge) => Math.abs(energyKeV / edge - 1) > 0.005)) {
      energies.push(energyKeV);
    }
  }
  return energies;
}

function relativeError(value: number, reference: number): number {
  return Math.abs(value / reference - 1);
}

describe('massAttenuationCm2PerG against the NIST values PHYSICS.md §7 quotes', () => {
  // PHYSICS.md §7 table (NIST SRD 126, Hubbell & Seltzer), 4 significant figures.
  const table: Array<[number, Partial<Record<MaterialId, number>>]> = [
    [
      20,
      {
        lead: 86.36,
        aluminium: 3.441,
        'carbon-fibre': 0.442,
        water: 0.8096,
        pmma: 0.5714,
      },
    ],
    [
      40,
      {
        lead: 14.36,
        aluminium: 0.5685,
        'carbon-fibre': 0.2076,
        water: 0.2683,
        pmma: 0.235,
      },
    ],
    [
      60,
      {
        lead: 5.021,
        aluminium: 0.2778,
        'carbon-fibre': 0.1753,
        water: 0.2059,
        pmma: 0.1924,
      },
    ],
    [
      80,
      {
        lead: 2.419,
        aluminium: 0.2018,
        'carbon-fibre': 0.161,
        water: 0.1837,
        pmma: 0.1751,
      },
    ],
    [
      100,
      {
        lead: 5.549,
        aluminium: 0.1704,
        'carbon-fibre': 0.1514,
        water: 0.1707,
        pmma: 0.1641,
      },
    ],
    [
      150,
      {
        lead: 2.014,
        aluminium: 0.1378,
        'carbon-fibre': 0.1347,
        water: 0.1505,
        pmma: 0.1456,
      },
    ],
  ];

  it.each(table)('gives the tabulated values at %d keV', (energyKeV, row) => {
    for (const [id, expected] of Object.entries(row)) {
      expect(
        relativeError(
          massAttenuationCm2PerG(id as MaterialId, energyKeV),
          expected,
        ),
      ).toBeLessThan(5e-4);
    }
  });

  it('gives both sides of the lead K edge at 88.0045 keV', () => {
    // PHYSICS.md §7: 1.910 below / 7.683 above the Pb K edge (NIST SRD 126).
    expect(massAttenuationCm2PerG('lead', 88.0045, 'below')).toBeCloseTo(
      1.91,
      3,
    );
    expect(massAttenuationCm2PerG('lead', 88.0045, 'above')).toBeCloseTo(
      7.683,
      3,
    );
    expect(massAttenuationCm2PerG('lead', 88.0)).toBeCloseTo(1.91, 2);
    expect(massAttenuationCm2PerG('lead', 88.01)).toBeCloseTo(7.68, 2);
  });
});

describe('massAttenuationCm2PerG against xraylib CS_Total', () => {
  beforeAll(() => requireReferencePython(['xraylib']));

  it('agrees within 0.5 % at the NIST grid energies from 5 to 200 keV', () => {
    const energies = [5, 6, 8, 10, 15, 20, 30, 40, 50, 60, 80, 100, 150, 200];
    const reference = xraylibValues(
      Object.fromEntries(MATERIAL_IDS.map((id) => [id, energies])),
    );
    for (const id of MATERIAL_IDS) {
      energies.forEach((energyKeV, index) => {
        // xraylib CS_Total (tests/reference/xraylib_mass_attenuation.py)
        expect(
          relativeError(
            massAttenuationCm2PerG(id, energyKeV),
            reference[id]![index]!,
          ),
          `${id} at ${energyKeV} keV`,
        ).toBeLessThan(0.005);
      });
    }
  });

  it('agrees within 0.5 % at random energies between edges', () => {
    const queries = Object.fromEntries(
      MATERIAL_IDS.map((id, index) => [
        id,
        energiesBetweenEdges(id, 60, 1000 + index),
      ]),
    ) as Record<MaterialId, number[]>;
    const reference = xraylibValues(queries);
    for (const id of MATERIAL_IDS) {
      queries[id].forEach((energyKeV, index) => {
        // xraylib CS_Total (tests/reference/xraylib_mass_attenuation.py)
        expect(
          relativeError(
            massAttenuationCm2PerG(id, energyKeV),
            reference[id]![index]!,
          ),
          `${id} at ${energyKeV.toFixed(3)} keV`,
        ).toBeLessThan(0.005);
      });
    }
  });

  it('stays on each side of the lead K and L edges', () => {
    const justBelow = [87.9, 13.0, 15.18, 15.84];
    const justAbove = [88.1, 13.06, 15.22, 15.88];
    const reference = xraylibValues({ lead: [...justBelow, ...justAbove] });
    [...justBelow, ...justAbove].forEach((energyKeV, index) => {
      // xraylib CS_Total (tests/reference/xraylib_mass_attenuation.py)
      expect(
        relativeError(
          massAttenuationCm2PerG('lead', energyKeV),
          reference.lead![index]!,
        ),
        `lead at ${energyKeV} keV`,
      ).toBeLessThan(0.005);
    });
  });
});

describe('attenuation tables', () => {
  it('lists each edge of an element as two rows at one energy, below first', () => {
    for (const table of Object.values(ELEMENT_TABLES)) {
      for (const edgeKeV of Object.values(table.edgesKeV)) {
        const rows = table.rows.filter(([energyKeV]) => energyKeV === edgeKeV);
        expect(rows).toHaveLength(2);
        expect(rows[1]![1]).toBeGreaterThan(rows[0]![1]);
      }
    }
  });

  it('builds cellulose from C6H10O5 by mass fraction', () => {
    // IUPAC standard atomic weights: C 12.011, H 1.008, O 15.999.
    const fractions = massFractions('cellulose');

    expect(fractions.C).toBeCloseTo(72.066 / 162.141, 6);
    expect(fractions.H).toBeCloseTo(10.08 / 162.141, 6);
    expect(fractions.O).toBeCloseTo(79.995 / 162.141, 6);
  });

  it('multiplies by the default density for a linear coefficient', () => {
    // PHYSICS.md §6: ρ Al 2.699 g/cm³; PHYSICS.md §7: μ/ρ Al at 60 keV 0.2778.
    expect(materialInfo('aluminium').defaultDensityGPerCm3).toBe(2.699);
    expect(linearAttenuationPerCm('aluminium', 60)).toBeCloseTo(
      0.2778 * 2.699,
      4,
    );
    expect(linearAttenuationPerCm('aluminium', 60, 1)).toBeCloseTo(0.2778, 4);
  });

  it('refuses energies outside the tables and non-positive densities', () => {
    expect(() =>
      massAttenuationCm2PerG('lead', TABLE_RANGE_KEV.max + 1),
    ).toThrow(DomainError);
    expect(() => massAttenuationCm2PerG('lead', 0.5)).toThrow(DomainError);
    expect(() => massAttenuationCm2PerG('lead', Number.NaN)).toThrow(
      DomainError,
    );
    expect(() => linearAttenuationPerCm('lead', 60, 0)).toThrow(DomainError);
  });
});
