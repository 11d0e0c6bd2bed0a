import type { CreateGridInput } from '../../../shared/schemas/equipment.schema.ts';
import { DetectorCalibration } from '../../models/detector-calibration.model.ts';
import { Detector } from '../../models/detector.model.ts';
import { Grid } from '../../models/grid.model.ts';
import { Room } from '../../models/room.model.ts';
import { XrayUnit } from '../../models/xray-unit.model.ts';
import type { AuditContext } from '../../services/audit.service.ts';
import { createCalibration } from '../../services/detector-calibration.service.ts';
import {
  createDetector,
  createRoom,
  createXrayUnit,
} from '../../services/equipment.service.ts';
import { createGrid } from '../../services/grid.service.ts';

// Everything here is invented for the demo: the hospital, the model names,
// the serial numbers, the calibration points and the stated grid figures.

/** The demo hospital. */
export const DEMO_SITE = 'Saltmarsh General Hospital';

/** Demo room names, by a stable key other seeds use. */
export const DEMO_ROOMS = {
  general: 'General Room 1',
  emergency: 'Emergency Room',
  paediatric: 'Paediatric Room',
  mobile: 'Bedside Mobile',
} as const;
export type DemoRoomKey = keyof typeof DEMO_ROOMS;

/** Demo grid labels, by key. */
export const DEMO_GRIDS = {
  wallStand12: 'SGH-G12 wall stand 12:1',
  table8: 'SGH-G08 table 8:1',
  mobile6: 'SGH-G06 mobile 6:1',
} as const;
export type DemoGridKey = keyof typeof DEMO_GRIDS;

/**
 * The grid a demo study of each room tests. The paediatric room borrows the
 * low-ratio mobile grid, as a removable grid is used for children.
 */
export const DEMO_STUDY_GRID: Record<DemoRoomKey, DemoGridKey> = {
  general: 'wallStand12',
  emergency: 'table8',
  paediatric: 'mobile6',
  mobile: 'mobile6',
};

interface DemoRoomSpec {
  modalityNotes: string;
  unit: { name: string; model: string; serial: string };
  detector: {
    name: string;
    model: string;
    detectorType: Detector['detectorType'];
    pixelPitchUm: number;
    serial: string;
  };
  /** Linear response PV = offset + gain·K (K in µGy) behind the points. */
  response: { offsetPv: number; gainPvPerUgy: number };
}

/** Demo unit and detector of each room. */
export const DEMO_ROOM_SPECS: Record<DemoRoomKey, DemoRoomSpec> = {
  general: {
    modalityNotes: 'General radiography: table Bucky and wall stand Bucky.',
    unit: {
      name: 'Ceiling tube',
      model: 'Saltmarsh Radiant 80 ceiling-mounted',
      serial: 'SGH-XU-0101',
    },
    detector: {
      name: 'Wireless panel 43×43',
      model: 'Saltmarsh DR-43 flat panel',
      detectorType: 'flat_panel_indirect',
      pixelPitchUm: 139,
      serial: 'SGH-DT-0101',
    },
    response: { offsetPv: 100, gainPvPerUgy: 400 },
  },
  emergency: {
    modalityNotes:
      'Emergency department: trolley and table work, trauma series.',
    unit: {
      name: 'Floor tube',
      model: 'Saltmarsh Radiant 65 floor-mounted',
      serial: 'SGH-XU-0201',
    },
    detector: {
      name: 'Table panel 43×43',
      model: 'Saltmarsh DR-43 flat panel',
      detectorType: 'flat_panel_indirect',
      pixelPitchUm: 139,
      serial: 'SGH-DT-0201',
    },
    response: { offsetPv: 80, gainPvPerUgy: 380 },
  },
  paediatric: {
    modalityNotes:
      'Paediatric radiography; grid use decided by part thickness and field size.',
    unit: {
      name: 'Ceiling tube',
      model: 'Saltmarsh Radiant 50 paediatric',
      serial: 'SGH-XU-0301',
    },
    detector: {
      name: 'Paediatric panel 35×43',
      model: 'Saltmarsh DR-35 direct panel',
      detectorType: 'flat_panel_direct',
      pixelPitchUm: 100,
      serial: 'SGH-DT-0301',
    },
    response: { offsetPv: 120, gainPvPerUgy: 520 },
  },
  mobile: {
    modalityNotes:
      'Bedside radiography on the wards with a mobile unit and a clip-on grid.',
    unit: {
      name: 'Mobile unit',
      model: 'Saltmarsh Wayfarer 32 kW mobile',
      serial: 'SGH-XU-0401',
    },
    detector: {
      name: 'Mobile wireless panel 35×43',
      model: 'Saltmarsh DR-35W flat panel',
      detectorType: 'flat_panel_indirect',
      pixelPitchUm: 150,
      serial: 'SGH-DT-0401',
    },
    response: { offsetPv: 90, gainPvPerUgy: 350 },
  },
};

const STATED_NOTE = 'Maker’s stated IEC 60627 values (invented for the demo).';

/** Demo grids as entered: some by r, N and t, one by h, D and t. */
export const DEMO_GRID_SPECS: Record<
  DemoGridKey,
  CreateGridInput & { room: DemoRoomKey }
> = {
  wallStand12: {
    label: DEMO_GRIDS.wallStand12,
    room: 'general',
    ratio: 12,
    stripFrequencyPerCm: 44,
    stripThicknessUm: 30,
    stripMaterial: 'lead',
    interspaceMaterial: 'aluminium',
    coverMaterial: 'carbon-fibre',
    focusDistanceCm: 180,
    focusRangeMinCm: 140,
    focusRangeMaxCm: 250,
    serial: 'SGH-GR-1201',
    statedTp: 0.66,
    statedTs: 0.08,
    statedContrastImprovementFactor: 3.37,
    statedBuckyFactor: 5.1,
    statedSelectivity: 8.25,
    statedFiguresNote: STATED_NOTE,
  },
  table8: {
    label: DEMO_GRIDS.table8,
    room: 'emergency',
    ratio: 8,
    stripFrequencyPerCm: 40,
    stripThicknessUm: 36,
    stripMaterial: 'lead',
    interspaceMaterial: 'aluminium',
    coverMaterial: 'carbon-fibre',
    focusDistanceCm: 100,
    focusRangeMinCm: 80,
    focusRangeMaxCm: 130,
    serial: 'SGH-GR-0801',
    statedTp: 0.72,
    statedTs: 0.14,
    statedContrastImprovementFactor: 2.81,
    statedBuckyFactor: 3.9,
    statedSelectivity: 5.14,
    statedFiguresNote: STATED_NOTE,
  },
  mobile6: {
    label: DEMO_GRIDS.mobile6,
    room: 'mobile',
    stripHeightUm: 1350,
    interspaceWidthUm: 225,
    stripThicknessUm: 53,
    stripMaterial: 'lead',
    interspaceMaterial: 'cellulose',
    coverMaterial: 'carbon-fibre',
    focusDistanceCm: 100,
    focusRangeMinCm: 75,
    focusRangeMaxCm: 150,
    serial: 'SGH-GR-0601',
    statedTp: 0.75,
    statedTs: 0.19,
    statedContrastImprovementFactor: 2.48,
    statedBuckyFactor: 3.3,
    statedSelectivity: 3.95,
    statedFiguresNote: STATED_NOTE,
  },
};

/** Flat-field air kerma at the detector, µGy. */
const DEMO_KERMAS_UGY = [0.5, 1, 2.5, 5, 10, 20];
/** Fixed relative deviations from the line, so the fit is not exact. */
const DEMO_DEVIATIONS = [0.004, -0.003, 0.002, -0.001, 0.0015, -0.002];

/** The flat-field points of a room's demo calibration (linear response). */
export function demoCalibrationPoints(room: DemoRoomKey) {
  const { offsetPv, gainPvPerUgy } = DEMO_ROOM_SPECS[room].response;
  return DEMO_KERMAS_UGY.map((airKermaUgy, i) => ({
    airKermaUgy,
    meanPixelValue:
      Math.round(
        (offsetPv + gainPvPerUgy * airKermaUgy * (1 + DEMO_DEVIATIONS[i]!)) *
          10,
      ) / 10,
  }));
}

const SEED_AUDIT: AuditContext = { actorId: null, ipAddress: null };

export async function up(): Promise<void> {
  for (const key of Object.keys(DEMO_ROOMS) as DemoRoomKey[]) {
    if (await Room.findOne({ where: { name: DEMO_ROOMS[key] } })) continue;
    const spec = DEMO_ROOM_SPECS[key];
    const room = await createRoom(
      {
        name: DEMO_ROOMS[key],
        site: DEMO_SITE,
        modalityNotes: spec.modalityNotes,
      },
      SEED_AUDIT,
    );
    await createXrayUnit({ roomId: room.id, ...spec.unit }, SEED_AUDIT);
    const detector = await createDetector(
      { roomId: room.id, ...spec.detector },
      SEED_AUDIT,
    );
    await createCalibration(
      detector,
      {
        calibratedOn: '2026-11-16',
        beamQualityNote:
          'RQA5 (about 70 kV, 21 mm Al added); air kerma measured at the detector plane, grid removed.',
        points: demoCalibrationPoints(key),
        model: 'linear',
        notes: 'Demo calibration (invented flat-field points).',
      },
      SEED_AUDIT,
    );
  }
  for (const { room, ...grid } of Object.values(DEMO_GRID_SPECS)) {
    if (await Grid.findOne({ where: { label: grid.label } })) continue;
    const owner = await Room.findOne({ where: { name: DEMO_ROOMS[room] } });
    await createGrid({ ...grid, roomId: owner?.id ?? null }, SEED_AUDIT);
  }
}

/** The seeded demo equipment, found by name. */
export interface DemoEquipment {
  rooms: Record<DemoRoomKey, Room>;
  units: Record<DemoRoomKey, XrayUnit>;
  detectors: Record<DemoRoomKey, Detector>;
  /** The newest calibration record of each room's detector. */
  calibrations: Record<DemoRoomKey, DetectorCalibration>;
  grids: Record<DemoGridKey, Grid>;
}

async function required<T>(what: string, found: Promise<T | null>): Promise<T> {
  const value = await found;
  if (!value)
    throw new Error(`The demo equipment seed has not run: no ${what}.`);
  return value;
}

/**
 * Looks up the seeded rooms, units, detectors, calibrations and grids, for
 * seeds that build on them (studies).
 * @throws Error when the equipment seed has not run.
 */
export async function findDemoEquipment(): Promise<DemoEquipment> {
  const entries = await Promise.all(
    (Object.keys(DEMO_ROOMS) as DemoRoomKey[]).map(async (key) => {
      const room = await required(
        `room “${DEMO_ROOMS[key]}”`,
        Room.findOne({ where: { name: DEMO_ROOMS[key] } }),
      );
      const spec = DEMO_ROOM_SPECS[key];
      const unit = await required(
        `unit of ${room.name}`,
        XrayUnit.findOne({ where: { roomId: room.id, name: spec.unit.name } }),
      );
      const detector = await required(
        `detector of ${room.name}`,
        Detector.findOne({
          where: { roomId: room.id, name: spec.detector.name },
        }),
      );
      const calibration = await required(
        `calibration of ${detector.name}`,
        DetectorCalibration.findOne({
          where: { detectorId: detector.id },
          order: [
            ['calibratedOn', 'DESC'],
            ['id', 'DESC'],
          ],
        }),
      );
      return { key, room, unit, detector, calibration };
    }),
  );
  const grids = await Promise.all(
    (Object.keys(DEMO_GRIDS) as DemoGridKey[]).map(
      async (key) =>
        [
          key,
          await required(
            `grid “${DEMO_GRIDS[key]}”`,
            Grid.findOne({ where: { label: DEMO_GRIDS[key] } }),
          ),
        ] as const,
    ),
  );
  const byRoom = <T>(pick: (entry: (typeof entries)[number]) => T) =>
    Object.fromEntries(
      entries.map((entry) => [entry.key, pick(entry)]),
    ) as Record<DemoRoomKey, T>;
  return {
    rooms: byRoom((e) => e.room),
    units: byRoom((e) => e.unit),
    detectors: byRoom((e) => e.detector),
    calibrations: byRoom((e) => e.calibration),
    grids: Object.fromEntries(grids) as Record<DemoGridKey, Grid>,
  };
}
