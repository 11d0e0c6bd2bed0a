import type { Actor } from '../../shared/permissions.ts';
import {
  type DetectorCalibrationDto,
  type DetectorDetailDto,
  type DetectorDto,
  type GridDto,
  type RoomDetailDto,
  type RoomDto,
  type XrayUnitDto,
} from '../../shared/schemas/equipment.schema.ts';
import { gridWarnings } from '../../shared/schemas/equipment-rules.ts';
import type { DetectorCalibration } from '../models/detector-calibration.model.ts';
import type { Detector } from '../models/detector.model.ts';
import type { Grid } from '../models/grid.model.ts';
import type { Room } from '../models/room.model.ts';
import type { XrayUnit } from '../models/xray-unit.model.ts';
import {
  canDeleteDetector,
  canDeleteRoom,
  canEditEquipment,
} from '../policies/equipment.policy.ts';

const editable = (viewer: Actor) => ({
  edit: canEditEquipment(viewer),
  delete: canEditEquipment(viewer),
});

export function presentRoom(
  room: Room,
  viewer: Actor,
  counts = { unitCount: 0, detectorCount: 0, gridCount: 0 },
): RoomDto {
  return {
    id: room.id,
    name: room.name,
    site: room.site,
    modalityNotes: room.modalityNotes,
    permissions: {
      edit: canEditEquipment(viewer),
      delete: canDeleteRoom(viewer, counts),
    },
  };
}

export function presentXrayUnit(unit: XrayUnit, viewer: Actor): XrayUnitDto {
  return {
    id: unit.id,
    roomId: unit.roomId,
    name: unit.name,
    model: unit.model,
    serial: unit.serial,
    permissions: editable(viewer),
  };
}

export function presentDetector(
  detector: Detector,
  calibrationCount: number,
  viewer: Actor,
): DetectorDto {
  return {
    id: detector.id,
    roomId: detector.roomId,
    name: detector.name,
    model: detector.model,
    detectorType: detector.detectorType,
    pixelPitchUm: detector.pixelPitchUm,
    serial: detector.serial,
    calibrationCount,
    permissions: {
      edit: canEditEquipment(viewer),
      delete: canDeleteDetector(viewer, { calibrationCount }),
    },
  };
}

export function presentGrid(grid: Grid, viewer: Actor): GridDto {
  return {
    id: grid.id,
    label: grid.label,
    roomId: grid.roomId,
    ratio: grid.ratio,
    stripFrequencyPerCm: grid.stripFrequencyPerCm,
    stripHeightUm: grid.stripHeightUm,
    interspaceWidthUm: grid.interspaceWidthUm,
    stripThicknessUm: grid.stripThicknessUm,
    derivedFields: grid.derivedFields,
    stripMaterial: grid.stripMaterial,
    interspaceMaterial: grid.interspaceMaterial,
    coverMaterial: grid.coverMaterial,
    focusDistanceCm: grid.focusDistanceCm,
    focusRangeMinCm: grid.focusRangeMinCm,
    focusRangeMaxCm: grid.focusRangeMaxCm,
    serial: grid.serial,
    statedTp: grid.statedTp,
    statedTs: grid.statedTs,
    statedContrastImprovementFactor: grid.statedContrastImprovementFactor,
    statedBuckyFactor: grid.statedBuckyFactor,
    statedSelectivity: grid.statedSelectivity,
    statedFiguresNote: grid.statedFiguresNote,
    notes: grid.notes,
    warnings: gridWarnings(grid),
    updatedAt: grid.updatedAt.toISOString(),
    permissions: editable(viewer),
  };
}

/** What a room holds, as loaded by the equipment service. */
export interface RoomContents {
  units: XrayUnit[];
  detectors: Detector[];
  grids: Grid[];
  calibrationCounts: Map<number, number>;
}

export function presentRoomDetail(
  room: Room,
  contents: RoomContents,
  viewer: Actor,
): RoomDetailDto {
  const units = contents.units.filter((u) => u.roomId === room.id);
  const detectors = contents.detectors.filter((d) => d.roomId === room.id);
  const grids = contents.grids.filter((g) => g.roomId === room.id);
  return {
    ...presentRoom(room, viewer, {
      unitCount: units.length,
      detectorCount: detectors.length,
      gridCount: grids.length,
    }),
    units: units.map((u) => presentXrayUnit(u, viewer)),
    detectors: detectors.map((d) =>
      presentDetector(d, contents.calibrationCounts.get(d.id) ?? 0, viewer),
    ),
    grids: grids.map((g) => presentGrid(g, viewer)),
  };
}

export function presentCalibration(
  calibration: DetectorCalibration,
  viewer: Actor,
): DetectorCalibrationDto {
  return {
    id: calibration.id,
    detectorId: calibration.detectorId,
    calibratedOn: calibration.calibratedOn,
    beamQualityNote: calibration.beamQualityNote,
    points: calibration.points,
    model: calibration.model,
    modelChoice: calibration.modelChoice,
    parameters: calibration.parameters,
    rSquared: calibration.rSquared,
    residuals: calibration.residuals,
    residualSd: calibration.residualSd,
    fits: calibration.fits,
    notes: calibration.notes,
    createdAt: calibration.createdAt.toISOString(),
    // A calibration is kept as recorded; a new record replaces it.
    permissions: { edit: false, delete: canEditEquipment(viewer) },
  };
}

export function presentDetectorDetail(
  detector: Detector,
  room: Room,
  calibrations: DetectorCalibration[],
  viewer: Actor,
): DetectorDetailDto {
  return {
    ...presentDetector(detector, calibrations.length, viewer),
    roomName: room.name,
    calibrations: calibrations.map((c) => presentCalibration(c, viewer)),
  };
}
