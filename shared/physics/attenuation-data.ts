/**
 * Photon mass attenuation coefficients μ/ρ (cm²/g, coherent scattering
 * included) from 1 keV to 300 keV.
 *
 * Values: NIST Standard Reference Database 126, J. H. Hubbell and
 * S. M. Seltzer, "Tables of X-Ray Mass Attenuation Coefficients and Mass
 * Energy-Absorption Coefficients" (NISTIR 5632, version 1.4, 2004), Table 3
 * (elements) and Table 4 (compounds and mixtures); public-domain data of the
 * U.S. Government. Absorption-edge energies are NIST's (the same values as
 * xraylib's `EdgeEnergy`).
 *
 * Layout: `[energyKeV, massAttenuationCm2PerG]` rows in ascending energy. An
 * absorption edge appears as two rows at the same energy, the value just
 * below the edge first, so an interpolator can keep to one side of it.
 *
 * @see https://www.nist.gov/pml/x-ray-mass-attenuation-coefficients
 */

/** One tabulated material: its rows and the edges inside 1–300 keV. */
export interface AttenuationTable {
  /** What the rows are, for display beside any value derived from them. */
  source: string;
  /** Absorption edges inside the table, by shell name, in keV. */
  edgesKeV: Readonly<Record<string, number>>;
  /** `[energyKeV, massAttenuationCm2PerG]`, ascending; edges appear twice. */
  rows: ReadonlyArray<readonly [number, number]>;
}

const TABLE_3 = 'NIST SRD 126 (Hubbell & Seltzer), Table 3';
const TABLE_4 = 'NIST SRD 126 (Hubbell & Seltzer), Table 4';

/** Energies shared by every table without an edge between 1 and 300 keV. */
const GRID_KEV = [
  1, 1.5, 2, 3, 4, 5, 6, 8, 10, 15, 20, 30, 40, 50, 60, 80, 100, 150, 200, 300,
] as const;

function onGrid(values: readonly number[]): Array<readonly [number, number]> {
  if (values.length !== GRID_KEV.length) {
    throw new Error('attenuation table does not match the standard grid');
  }
  return GRID_KEV.map((energyKeV, index) => [energyKeV, values[index]!]);
}

/** Elements, NIST SRD 126 Table 3. */
export const ELEMENT_TABLES = {
  H: {
    source: `${TABLE_3}, hydrogen`,
    edgesKeV: {},
    rows: onGrid([
      7.217, 2.148, 1.059, 0.5612, 0.4546, 0.4193, 0.4042, 0.3914, 0.3854,
      0.3764, 0.3695, 0.357, 0.3458, 0.3355, 0.326, 0.3091, 0.2944, 0.2651,
      0.2429, 0.2112,
    ]),
  },
  C: {
    source: `${TABLE_3}, carbon (graphite)`,
    edgesKeV: {},
    rows: onGrid([
      2211, 700.2, 302.6, 90.33, 37.78, 19.12, 10.95, 4.576, 2.373, 0.8071,
      0.442, 0.2562, 0.2076, 0.1871, 0.1753, 0.161, 0.1514, 0.1347, 0.1229,
      0.1066,
    ]),
  },
  O: {
    source: `${TABLE_3}, oxygen`,
    edgesKeV: {},
    rows: onGrid([
      4590, 1549, 694.9, 217.1, 93.15, 47.9, 27.7, 11.63, 5.952, 1.836, 0.8651,
      0.3779, 0.2585, 0.2132, 0.1907, 0.1678, 0.1551, 0.1361, 0.1237, 0.107,
    ]),
  },
  Al: {
    source: `${TABLE_3}, aluminium`,
    edgesKeV: { K: 1.5596 },
    rows: [
      [1, 1185],
      [1.5, 402.2],
      [1.5596, 362.1],
      [1.5596, 3957],
      [2, 2263],
      [3, 788],
      [4, 360.5],
      [5, 193.4],
      [6, 115.3],
      [8, 50.33],
      [10, 26.23],
      [15, 7.955],
      [20, 3.441],
      [30, 1.128],
      [40, 0.5685],
      [50, 0.3681],
      [60, 0.2778],
      [80, 0.2018],
      [100, 0.1704],
      [150, 0.1378],
      [200, 0.1223],
      [300, 0.1042],
    ],
  },
  Cu: {
    source: `${TABLE_3}, copper`,
    edgesKeV: { L1: 1.0961, K: 8.9789 },
    rows: [
      [1, 10570],
      [1.047, 9307],
      [1.0961, 8242],
      [1.0961, 9347],
      [1.5, 4418],
      [2, 2154],
      [3, 748.8],
      [4, 347.3],
      [5, 189.9],
      [6, 115.6],
      [8, 52.55],
      [8.9789, 38.29],
      [8.9789, 278.4],
      [10, 215.9],
      [15, 74.05],
      [20, 33.79],
      [30, 10.92],
      [40, 4.862],
      [50, 2.613],
      [60, 1.593],
      [80, 0.763],
      [100, 0.4584],
      [150, 0.2217],
      [200, 0.1559],
      [300, 0.1119],
    ],
  },
  Pb: {
    source: `${TABLE_3}, lead`,
    edgesKeV: {
      M5: 2.484,
      M4: 2.5856,
      M3: 3.0664,
      M2: 3.5542,
      M1: 3.8507,
      L3: 13.0352,
      L2: 15.2,
      L1: 15.8608,
      K: 88.0045,
    },
    rows: [
      [1, 5210],
      [1.5, 2356],
      [2, 1285],
      [2.484, 800.6],
      [2.484, 1397],
      [2.534, 1726],
      [2.5856, 1944],
      [2.5856, 2458],
      [3, 1965],
      [3.0664, 1857],
      [3.0664, 2146],
      [3.301, 1796],
      [3.5542, 1496],
      [3.5542, 1585],
      [3.699, 1442],
      [3.8507, 1311],
      [3.8507, 1368],
      [4, 1251],
      [5, 730.4],
      [6, 467.2],
      [8, 228.7],
      [10, 130.6],
      [13.0352, 67.01],
      [13.0352, 162.1],
      [15, 111.6],
      [15.2, 107.8],
      [15.2, 148.5],
      [15.53, 141.6],
      [15.8608, 134.4],
      [15.8608, 154.8],
      [20, 86.36],
      [30, 30.32],
      [40, 14.36],
      [50, 8.041],
      [60, 5.021],
      [80, 2.419],
      [88.0045, 1.91],
      [88.0045, 7.683],
      [100, 5.549],
      [150, 2.014],
      [200, 0.9985],
      [300, 0.4031],
    ],
  },
} as const satisfies Record<string, AttenuationTable>;

/** Compounds and mixtures tabulated by NIST SRD 126 Table 4. */
export const COMPOUND_TABLES = {
  water: {
    source: `${TABLE_4}, water (liquid)`,
    edgesKeV: {},
    rows: onGrid([
      4078, 1376, 617.3, 192.9, 82.78, 42.58, 24.64, 10.37, 5.329, 1.673,
      0.8096, 0.3756, 0.2683, 0.2269, 0.2059, 0.1837, 0.1707, 0.1505, 0.137,
      0.1186,
    ]),
  },
  pmma: {
    source: `${TABLE_4}, polymethyl methacrylate`,
    edgesKeV: {},
    rows: onGrid([
      2794, 915.3, 403.7, 123.6, 52.47, 26.81, 15.45, 6.494, 3.357, 1.101,
      0.5714, 0.3032, 0.235, 0.2074, 0.1924, 0.1751, 0.1641, 0.1456, 0.1328,
      0.1152,
    ]),
  },
  polyester: {
    source: `${TABLE_4}, polyethylene terephthalate`,
    edgesKeV: {},
    rows: onGrid([
      2911, 953.6, 420.6, 128.8, 54.66, 27.92, 16.08, 6.75, 3.481, 1.132,
      0.5798, 0.3009, 0.2304, 0.202, 0.1868, 0.1695, 0.1586, 0.1406, 0.1282,
      0.1111,
    ]),
  },
  air: {
    source: `${TABLE_4}, air (dry, near sea level)`,
    edgesKeV: { ArK: 3.2029 },
    rows: [
      [1, 3606],
      [1.5, 1191],
      [2, 527.9],
      [3, 162.5],
      [3.2029, 134],
      [3.2029, 148.5],
      [4, 77.88],
      [5, 40.27],
      [6, 23.41],
      [8, 9.921],
      [10, 5.12],
      [15, 1.614],
      [20, 0.7779],
      [30, 0.3538],
      [40, 0.2485],
      [50, 0.208],
      [60, 0.1875],
      [80, 0.1662],
      [100, 0.1541],
      [150, 0.1356],
      [200, 0.1233],
      [300, 0.1067],
    ],
  },
} as const satisfies Record<string, AttenuationTable>;

/** An element this file tabulates. */
export type TabulatedElement = keyof typeof ELEMENT_TABLES;

/** A compound or mixture this file tabulates. */
export type TabulatedCompound = keyof typeof COMPOUND_TABLES;

/**
 * Standard atomic weights (g/mol) of the elements used in mixture-rule
 * materials, IUPAC abridged values (2021).
 */
export const ATOMIC_WEIGHT_G_PER_MOL: Readonly<
  Record<TabulatedElement, number>
> = { H: 1.008, C: 12.011, O: 15.999, Al: 26.982, Cu: 63.546, Pb: 207.2 };

/**
 * Energies Lamella answers for, in keV. Every table also holds its 300 keV
 * row so that the spline's free end lies beyond 200 keV: with 200 keV as the
 * last knot the end condition alone put copper 0.5 % off xraylib at 180 keV.
 */
export const TABLE_RANGE_KEV = { min: 1, max: 200 } as const;
