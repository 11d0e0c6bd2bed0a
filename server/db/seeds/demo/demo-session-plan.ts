import { linearAttenuationPerCm } from '../../../../shared/physics/attenuation.ts';
import { kramersSpectrum } from '../../../../shared/physics/x-ray-spectrum.ts';
import { DEFAULT_TOTAL_FILTRATION_MM_AL } from '../../../../shared/schemas/geometry-api.schema.ts';
import type { RegionLayout } from '../../../../shared/analysis/region-layout.ts';
import type {
  Arm,
  StudyPlanInput,
} from '../../../../shared/schemas/study.schema.ts';
import {
  deviationIndex,
  exposureIndexFromAirKerma,
} from '../../../../shared/physics/exposure-index.ts';
import {
  phantomTruth,
  type PhantomSpec,
} from '../../../synthetic/phantom-image.ts';
import type {
  PhantomExposure,
  PhantomSessionPlan,
} from '../../../synthetic/phantom-session.ts';
import {
  DEMO_GRID_SPECS,
  DEMO_ROOM_SPECS,
  DEMO_STUDY_GRID,
  type DemoGridKey,
  type DemoRoomKey,
} from '../20261201090000-demo-equipment.ts';

/**
 * The demo hospital's grid studies as sessions of synthetic exposures: for
 * every planned kV and PMMA thickness, replicate images with and without the
 * grid whose primary P, scatter S = SPR·P, grid transmissions Tp and Ts,
 * contrast disc and quantum noise are known, so the figures Lamella computes
 * from them can be checked against their analytic values.
 *
 * Every number here is invented for the demo: tube output, scatter-to-primary
 * ratios and field transmissions are of the magnitudes published for PMMA
 * phantoms and clinical grids (from memory), not measurements.
 */

/** A demo study, by a stable key. */
export type DemoStudyKey =
  | 'general'
  | 'emergency'
  | 'paediatric'
  | 'mobile'
  | 'chestReview'
  | 'bedsideDraft';

/** How far through the review cycle the seed takes a study. */
export type DemoStage = 'signed' | 'submitted' | 'draft';

/** One demo study: its room, grid, plan and invented session. */
export interface DemoStudySpec {
  key: DemoStudyKey;
  room: DemoRoomKey;
  grid: DemoGridKey;
  stage: DemoStage;
  title: string;
  purpose: string;
  /** ISO date of the session in the room. */
  sessionDate: string;
  stationName: string;
  kvps: number[];
  thicknessesCm: number[];
  sidCm: number;
  field: { widthCm: number; heightCm: number };
  replicates: number;
  /** SPR of the slab without grid at 80 kV, by thickness in cm (invented). */
  scatterToPrimaryRatioAt80Kv: Record<number, number>;
  /** Detector elements per image pixel along each side (images are binned). */
  binning: number;
  /** Detector air kerma the AEC stops at, µGy (with or without the grid). */
  targetKermaUgy: number;
  /** Where the phantom sat on the no-grid exposures, relative to the grid ones, px. */
  noGridShiftPx: { dx: number; dy: number };
}

/** Image size of every demo exposure (binned, so the seed stays fast). */
const DEMO_IMAGE_SIZE_PX = 256;

/** The contrast object on every demo phantom: a thin aluminium disc. */
export const DEMO_DISC = {
  name: 'Al disc',
  material: 'aluminium',
  thicknessMm: 1,
  diameterMm: 30,
} as const;

/** Quanta detected per µGy per mm² (RQA5-like fluence × DQE; invented). */
const DETECTED_QUANTA_PER_UGY_PER_MM2 = 18_000;

/** Tube output at 1 m behind 2.5 mm Al, µGy/mAs, at 80 kV (invented). */
const TUBE_OUTPUT_AT_80_KV_UGY_PER_MAS = 50;

/** AEC reproducibility between replicates (within 1 %, so no warning). */
const REPLICATE_EXPOSURE_FACTORS = [1, 1.004, 0.997, 1.002];

/** Tube output at 1 m, µGy/mAs: the 80 kV figure scaled as kV² (invented). */
const tubeOutputAt1mUgyPerMas = (kvp: number): number =>
  TUBE_OUTPUT_AT_80_KV_UGY_PER_MAS * (kvp / 80) ** 2;

/** How most demo sessions are taken: 3 replicates, 8×8 bins, AEC at 2.5 µGy. */
const USUAL_SESSION = {
  replicates: 3,
  binning: 8,
  targetKermaUgy: 2.5,
} satisfies Partial<DemoStudySpec>;

/** The bedside set-up, shared by the signed mobile study and its repeat. */
const BEDSIDE_SESSION = {
  room: 'mobile',
  grid: DEMO_STUDY_GRID.mobile,
  stationName: 'SGH-MOB1',
  kvps: [70, 90],
  thicknessesCm: [15, 20],
  sidCm: 100,
  field: { widthCm: 30, heightCm: 35 },
  scatterToPrimaryRatioAt80Kv: { 15: 3.0, 20: 4.3 },
  ...USUAL_SESSION,
} satisfies Partial<DemoStudySpec>;

/**
 * The studies the seed creates: a signed study per room spanning 60–120 kV
 * and 10–25 cm PMMA across the rooms, one submitted and one draft.
 */
export const DEMO_STUDIES: readonly DemoStudySpec[] = [
  {
    key: 'general',
    room: 'general',
    grid: DEMO_STUDY_GRID.general,
    stage: 'signed',
    title: 'Wall-stand 12:1 grid, adult abdomen and spine thicknesses',
    purpose:
      'Annual check of the wall-stand grid: does the 12:1 grid still pay for its Bucky factor at adult thicknesses (20 and 25 cm PMMA) across the kV used for abdomen, pelvis and lumbar spine?',
    sessionDate: '2026-11-17',
    stationName: 'SGH-RAD1',
    kvps: [81, 102, 120],
    thicknessesCm: [20, 25],
    sidCm: 150,
    field: { widthCm: 35, heightCm: 35 },
    scatterToPrimaryRatioAt80Kv: { 20: 4.4, 25: 5.8 },
    ...USUAL_SESSION,
    noGridShiftPx: { dx: 4, dy: -3 },
  },
  {
    key: 'emergency',
    room: 'emergency',
    grid: DEMO_STUDY_GRID.emergency,
    stage: 'signed',
    title: 'Table 8:1 grid, trauma thicknesses',
    purpose:
      'Commissioning check of the trolley-table grid after the Bucky tray was replaced: CIF, Bucky factor and SNR improvement at equal dose at 15 and 20 cm PMMA.',
    sessionDate: '2026-11-19',
    stationName: 'SGH-ED1',
    kvps: [70, 90],
    thicknessesCm: [15, 20],
    sidCm: 110,
    field: { widthCm: 30, heightCm: 30 },
    scatterToPrimaryRatioAt80Kv: { 15: 2.7, 20: 3.9 },
    ...USUAL_SESSION,
    noGridShiftPx: { dx: 6, dy: -5 },
  },
  {
    key: 'paediatric',
    room: 'paediatric',
    grid: DEMO_STUDY_GRID.paediatric,
    stage: 'signed',
    title: 'Removable 6:1 grid for children: 10 and 15 cm',
    purpose:
      'Grid policy for the paediatric room: at which thickness does the removable 6:1 grid start to improve CNR at equal dose? Small field, low kV, 10 and 15 cm PMMA.',
    sessionDate: '2026-11-20',
    stationName: 'SGH-PAED1',
    kvps: [60, 70],
    thicknessesCm: [10, 15],
    sidCm: 110,
    field: { widthCm: 13, heightCm: 13 },
    scatterToPrimaryRatioAt80Kv: { 10: 0.42, 15: 0.85 },
    ...USUAL_SESSION,
    binning: 5,
    targetKermaUgy: 2,
    noGridShiftPx: { dx: 0, dy: 0 },
  },
  {
    key: 'mobile',
    stage: 'signed',
    title: 'Clip-on 6:1 grid for bedside chest and abdomen',
    purpose:
      'Is the low-ratio clip-on grid worth carrying on the wards? Bedside geometry at 100 cm, 15 and 20 cm PMMA, 70 and 90 kV.',
    sessionDate: '2026-11-23',
    ...BEDSIDE_SESSION,
    noGridShiftPx: { dx: -3, dy: 2 },
  },
  {
    key: 'chestReview',
    room: 'general',
    grid: DEMO_STUDY_GRID.general,
    stage: 'submitted',
    title: 'Wall-stand 12:1 grid at chest distance (180 cm)',
    purpose:
      'The wall stand is used at its focusing distance for chests: check the 12:1 grid at 180 cm with chest-like thicknesses (15 and 20 cm PMMA) and high kV.',
    sessionDate: '2026-11-26',
    stationName: 'SGH-RAD1',
    kvps: [102, 120],
    thicknessesCm: [15, 20],
    sidCm: 180,
    field: { widthCm: 35, heightCm: 35 },
    scatterToPrimaryRatioAt80Kv: { 15: 3.1, 20: 4.4 },
    ...USUAL_SESSION,
    noGridShiftPx: { dx: 2, dy: 2 },
  },
  {
    key: 'bedsideDraft',
    stage: 'draft',
    title: 'Clip-on 6:1 grid on the second mobile panel',
    purpose:
      'Repeat of the bedside grid check with the spare mobile panel: session uploaded, to be paired and measured.',
    sessionDate: '2026-11-30',
    ...BEDSIDE_SESSION,
    noGridShiftPx: { dx: 3, dy: 0 },
  },
];

/** The plan of a demo study, as the plan form would send it. */
export function demoStudyPlan(study: DemoStudySpec): StudyPlanInput {
  return {
    phantom: {
      material: 'pmma',
      thicknessesCm: study.thicknessesCm,
      contrastObjects: [{ ...DEMO_DISC }],
    },
    beamQualities: study.kvps.map((kvp) => ({
      kvp,
      addedFiltration: [],
      hvlMmAl: null,
    })),
    geometry: {
      sidCm: study.sidCm,
      fieldWidthCm: study.field.widthCm,
      fieldHeightCm: study.field.heightCm,
    },
    exposure: { mode: 'aec', chamber: 'centre' },
    replicates: study.replicates,
  };
}

/** Square pixel spacing of a study's images: the detector pitch × binning, mm. */
function demoPixelSpacingMm(study: DemoStudySpec): number {
  return (
    (DEMO_ROOM_SPECS[study.room].detector.pixelPitchUm * study.binning) / 1000
  );
}

/** What the generator is told about one condition (all invented). */
interface DemoConditionPhysics {
  primaryTransmission: number;
  scatterTransmission: number;
  scatterToPrimaryRatio: number;
  /** Fraction of the primary the disc removes. */
  primaryContrast: number;
  /** Primary air kerma at the detector without grid, µGy per mAs. */
  primaryKermaUgyPerMas: number;
}

/**
 * Energy-weighted transmission of a filtered Kramers beam through a layer,
 * and the spectrum behind it.
 */
function throughLayer(
  bins: Array<{ energyKeV: number; weight: number }>,
  material: 'pmma' | 'aluminium',
  thicknessCm: number,
) {
  const behind = bins.map((b) => ({
    energyKeV: b.energyKeV,
    weight:
      b.weight *
      Math.exp(-linearAttenuationPerCm(material, b.energyKeV) * thicknessCm),
  }));
  const sum = (list: typeof bins) => list.reduce((s, b) => s + b.weight, 0);
  return { transmission: sum(behind) / sum(bins), behind };
}

/**
 * The invented physics of one demo condition: primary through the slab and
 * disc contrast from a Kramers spectrum (2.5 mm Al) and NIST attenuation of
 * PMMA and aluminium; field Tp and Ts drifting from the grid's stated values
 * with kV (harder beams pass the strips more easily); SPR from the study's
 * table, rising slowly with kV.
 */
function demoConditionPhysics(
  study: DemoStudySpec,
  kvp: number,
  thicknessCm: number,
): DemoConditionPhysics {
  const grid = DEMO_GRID_SPECS[study.grid];
  const spr80 = study.scatterToPrimaryRatioAt80Kv[thicknessCm];
  if (spr80 === undefined) {
    throw new Error(`demo study ${study.key} has no SPR at ${thicknessCm} cm`);
  }
  const spectrum = kramersSpectrum(kvp, [
    { material: 'aluminium', thicknessMm: DEFAULT_TOTAL_FILTRATION_MM_AL },
  ]).map((b) => ({ energyKeV: b.energyKeV, weight: b.fluence * b.energyKeV }));
  const slab = throughLayer(spectrum, 'pmma', thicknessCm);
  const disc = throughLayer(
    slab.behind,
    'aluminium',
    DEMO_DISC.thicknessMm / 10,
  );
  const outputAt1m = tubeOutputAt1mUgyPerMas(kvp);
  return {
    primaryTransmission: grid.statedTp! * (1 + 0.0015 * (kvp - 100)),
    scatterTransmission: grid.statedTs! * (kvp / 100) ** 0.7,
    scatterToPrimaryRatio: spr80 * (kvp / 80) ** 0.1,
    primaryContrast: 1 - disc.transmission,
    primaryKermaUgyPerMas:
      outputAt1m * (100 / study.sidCm) ** 2 * slab.transmission,
  };
}

/** One exposure of a demo session, with where it belongs in the plan. */
export interface DemoExposure extends PhantomExposure {
  kvp: number;
  thicknessCm: number;
  arm: Arm;
  replicate: number;
}

/** One condition's session: the plan handed to the generator and its exposures. */
export interface DemoSession {
  kvp: number;
  thicknessCm: number;
  plan: Omit<PhantomSessionPlan, 'exposures'> & { exposures: DemoExposure[] };
}

const round = (value: number, digits: number) => Number(value.toFixed(digits));

/** A condition's session plan with no exposures yet. */
function newSession(
  study: DemoStudySpec,
  kvp: number,
  thicknessCm: number,
): DemoSession {
  const grid = DEMO_GRID_SPECS[study.grid];
  const ratio = Math.round(
    grid.ratio ?? grid.stripHeightUm! / grid.interspaceWidthUm!,
  );
  const fieldAt1mCm2 =
    study.field.widthCm * study.field.heightCm * (100 / study.sidCm) ** 2;
  const outputAt1m = tubeOutputAt1mUgyPerMas(kvp);
  const entranceCm = study.sidCm - thicknessCm - 5;
  return {
    kvp,
    thicknessCm,
    plan: {
      stationName: study.stationName,
      kvp,
      bodyPartThicknessMm: thicknessCm * 10,
      sidMm: study.sidCm * 10,
      gridType: 'FOCUSED',
      gridId: grid.serial ?? undefined,
      gridFocalDistanceMm: grid.focusDistanceCm! * 10,
      gridAspectRatio: [ratio, 1],
      targetExposureIndex: round(100 * study.targetKermaUgy, 0),
      // DAP = K(1 m)·A(1 m); entrance kerma with a backscatter factor of 1.3.
      dapDgyCm2PerMas: outputAt1m * 1e-5 * fieldAt1mCm2,
      entranceDoseMgyPerMas:
        (outputAt1m / 1000) * (100 / entranceCm) ** 2 * 1.3,
      date: study.sessionDate,
      exposures: [],
    },
  };
}

const clock = (minutes: number) =>
  `${String(9 + Math.floor(minutes / 60)).padStart(2, '0')}${String(minutes % 60).padStart(2, '0')}00`;

/**
 * Every exposure of a demo study, grouped by condition, in the order the
 * checklist asks for them (per thickness: all kV with the grid, then
 * without), a minute apart and five minutes per phantom change. Each has
 * its own noise seed, an AEC exposure that brings the detector to the
 * target air kerma, and the phantom's offset on no-grid images.
 */
export function demoSessions(study: DemoStudySpec): DemoSession[] {
  const studyIndex = DEMO_STUDIES.findIndex((s) => s.key === study.key);
  const spacingMm = demoPixelSpacingMm(study);
  const { offsetPv, gainPvPerUgy } = DEMO_ROOM_SPECS[study.room].response;
  const pixelAreaMm2 = spacingMm * spacingMm;
  const sessions = new Map<string, DemoSession>();
  let minute = 0;
  for (const thicknessCm of study.thicknessesCm) {
    minute += 5;
    for (const arm of ['grid', 'no_grid'] as const) {
      for (const kvp of study.kvps) {
        const physics = demoConditionPhysics(study, kvp, thicknessCm);
        const key = `${kvp}|${thicknessCm}`;
        const session =
          sessions.get(key) ?? newSession(study, kvp, thicknessCm);
        sessions.set(key, session);
        const transmissions =
          arm === 'grid'
            ? {
                primaryTransmission: physics.primaryTransmission,
                scatterTransmission: physics.scatterTransmission,
              }
            : null;
        const detectorPerMas =
          physics.primaryKermaUgyPerMas *
          (transmissions
            ? transmissions.primaryTransmission +
              physics.scatterToPrimaryRatio * transmissions.scatterTransmission
            : 1 + physics.scatterToPrimaryRatio);
        const shift = arm === 'grid' ? { dx: 0, dy: 0 } : study.noGridShiftPx;
        for (let replicate = 1; replicate <= study.replicates; replicate++) {
          minute += 1;
          const exposureMas = round(
            (study.targetKermaUgy / detectorPerMas) *
              REPLICATE_EXPOSURE_FACTORS[
                (replicate - 1) % REPLICATE_EXPOSURE_FACTORS.length
              ]!,
            2,
          );
          const spec: PhantomSpec = {
            columns: DEMO_IMAGE_SIZE_PX,
            rows: DEMO_IMAGE_SIZE_PX,
            seed:
              1_000_000 * (studyIndex + 1) +
              10_000 * kvp +
              100 * thicknessCm +
              10 * (arm === 'grid' ? 1 : 2) +
              replicate,
            pixelSpacingMm: spacingMm,
            exposureMas,
            primaryKermaUgyPerMas: physics.primaryKermaUgyPerMas,
            scatterToPrimaryRatio: physics.scatterToPrimaryRatio,
            grid: transmissions,
            kermaPerQuantumUgy:
              1 / (DETECTED_QUANTA_PER_UGY_PER_MM2 * pixelAreaMm2),
            object: {
              cx: DEMO_IMAGE_SIZE_PX / 2 + shift.dx,
              cy: DEMO_IMAGE_SIZE_PX / 2 + shift.dy,
              radiusPx: DEMO_DISC.diameterMm / 2 / spacingMm,
              primaryContrast: physics.primaryContrast,
            },
            response: {
              model: 'linear',
              offset: offsetPv,
              gainPerUgy: gainPvPerUgy,
            },
          };
          // Written as a modality would: a whole EI, DI to two decimals.
          const exposureIndex = Math.round(
            exposureIndexFromAirKerma(phantomTruth(spec).totalUgy),
          );
          session.plan.exposures.push({
            fileName: `${study.stationName}_${thicknessCm}cm_${kvp}kV_${arm === 'grid' ? 'grid' : 'open'}_${replicate}.dcm`,
            spec,
            attributes: {
              AcquisitionTime: clock(minute),
              ExposureIndex: exposureIndex,
              DeviationIndex: round(
                deviationIndex(
                  exposureIndex,
                  session.plan.targetExposureIndex!,
                ),
                2,
              ),
              SeriesDescription: `PMMA ${thicknessCm} cm ${kvp} kV ${arm === 'grid' ? 'with grid' : 'without grid'}`,
            },
            kvp,
            thicknessCm,
            arm,
            replicate,
          });
        }
      }
    }
  }
  return [...sessions.values()];
}

/**
 * The region layout for a demo study's images, in mm from the top-left
 * corner: a circle inside the disc and a ring of background around it,
 * clear of the disc's edge.
 */
export function demoRegionLayout(study: DemoStudySpec): RegionLayout {
  const centreMm = round(
    (DEMO_IMAGE_SIZE_PX / 2) * demoPixelSpacingMm(study),
    2,
  );
  const discRadiusMm = DEMO_DISC.diameterMm / 2;
  return {
    name: 'PMMA slab with 1 mm Al disc',
    description: `Disc of ${DEMO_DISC.diameterMm} mm at the centre of the slab; background ring from 1.5 to 2.5 disc radii.`,
    units: 'mm',
    regions: [
      {
        name: 'Al disc',
        role: 'object',
        spec: `circle:${centreMm},${centreMm},${round(0.7 * discRadiusMm, 2)}`,
      },
      {
        name: 'slab ring',
        role: 'background',
        spec: `ring:${centreMm},${centreMm},${round(1.5 * discRadiusMm, 2)},${round(2.5 * discRadiusMm, 2)}`,
      },
    ],
  };
}
