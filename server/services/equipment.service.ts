import {
  ForeignKeyConstraintError,
  Op,
  UniqueConstraintError,
  type Model,
  type Transaction,
} from 'sequelize';
import type {
  CreateDetectorInput,
  CreateRoomInput,
  CreateXrayUnitInput,
  UpdateDetectorInput,
  UpdateRoomInput,
  UpdateXrayUnitInput,
} from '../../shared/schemas/equipment.schema.ts';
import { sequelize } from '../db/sequelize.ts';
import { conflict, notFound, validationFailed } from '../errors.ts';
import { DetectorCalibration } from '../models/detector-calibration.model.ts';
import { Detector } from '../models/detector.model.ts';
import { Grid } from '../models/grid.model.ts';
import { Room } from '../models/room.model.ts';
import { XrayUnit } from '../models/xray-unit.model.ts';
import type { RoomContents } from '../presenters/equipment.presenter.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';

/** Messages for the write errors the database can raise. */
export interface WriteErrorMessages {
  /** For a unique index broken (a name already used). */
  duplicate?: string;
  /** For a foreign key that still points at the record (deleting). */
  inUse?: string;
}

/**
 * Runs a change and its audit entry in one transaction, so both or neither
 * are kept, and turns database refusals into 409 answers.
 * @param work makes the change; returns the record and the audit event.
 * @throws AppError 409 for a duplicate or a record still in use.
 */
export async function auditedChange<T>(
  audit: AuditContext,
  messages: WriteErrorMessages,
  work: (transaction: Transaction) => Promise<{
    result: T;
    event: {
      action: string;
      targetType: string;
      targetId: number;
      details: Record<string, unknown>;
    };
  }>,
): Promise<T> {
  try {
    return await sequelize.transaction(async (transaction) => {
      const { result, event } = await work(transaction);
      await recordAudit(audit, event, transaction);
      return result;
    });
  } catch (error) {
    if (error instanceof UniqueConstraintError)
      throw conflict(messages.duplicate ?? 'This already exists.');
    if (error instanceof ForeignKeyConstraintError) {
      throw conflict(
        messages.inUse ?? 'Something this refers to no longer exists.',
      );
    }
    throw error;
  }
}

/** A record's stored fields, without ids and timestamps, for audit details. */
export function snapshot(record: Model): Record<string, unknown> {
  const {
    id: _id,
    createdAt: _c,
    updatedAt: _u,
    ...fields
  } = record.get({ plain: true }) as Record<string, unknown>;
  return fields;
}

/** Only the keys the caller gave (zod leaves absent keys out). */
export function definedOnly<T extends object>(input: T): Partial<T> {
  return Object.fromEntries(
    Object.entries(input).filter(([, value]) => value !== undefined),
  ) as Partial<T>;
}

/** The previous values of the fields a change touches, for audit details. */
export function previousValues(
  record: Model,
  change: object,
): Record<string, unknown> {
  return Object.fromEntries(
    Object.keys(change).map((key) => [key, record.get(key)]),
  );
}

/** All rooms, by name. */
export function listRooms(): Promise<Room[]> {
  return Room.findAll({ order: [['name', 'ASC']] });
}

/** @throws AppError 404 when there is no such room. */
export async function findRoomById(
  id: number,
  transaction?: Transaction,
): Promise<Room> {
  const room = await Room.findByPk(id, { transaction });
  if (!room) throw notFound('room');
  return room;
}

/** @throws AppError 400 naming `roomId` when the room does not exist. */
export async function requireRoomReference(
  roomId: number,
  transaction?: Transaction,
): Promise<void> {
  if (!(await Room.findByPk(roomId, { transaction }))) {
    throw validationFailed([
      { path: 'roomId', message: 'There is no room with this id.' },
    ]);
  }
}

/** Calibration record counts per detector id (0 is left out). */
export async function calibrationCounts(
  detectorIds: number[],
): Promise<Map<number, number>> {
  if (detectorIds.length === 0) return new Map();
  const rows = (await DetectorCalibration.count({
    where: { detectorId: { [Op.in]: detectorIds } },
    group: ['detectorId'],
  })) as unknown as { detectorId: number; count: number }[];
  return new Map(rows.map((row) => [row.detectorId, Number(row.count)]));
}

/** The units, detectors and grids kept in the given rooms. */
export async function loadRoomContents(
  roomIds: number[],
): Promise<RoomContents> {
  const where = { roomId: { [Op.in]: roomIds } };
  const [units, detectors, grids] = await Promise.all([
    XrayUnit.findAll({ where, order: [['name', 'ASC']] }),
    Detector.findAll({ where, order: [['name', 'ASC']] }),
    Grid.findAll({ where, order: [['label', 'ASC']] }),
  ]);
  return {
    units,
    detectors,
    grids,
    calibrationCounts: await calibrationCounts(detectors.map((d) => d.id)),
  };
}

const roomMessages = (name?: string): WriteErrorMessages => ({
  duplicate: `A room named “${name}” already exists.`,
});

/**
 * Adds a room.
 * @throws AppError 409 when the name is taken.
 */
export function createRoom(
  input: CreateRoomInput,
  audit: AuditContext,
): Promise<Room> {
  return auditedChange(audit, roomMessages(input.name), async (transaction) => {
    const room = await Room.create(
      { ...input, modalityNotes: input.modalityNotes ?? null },
      { transaction },
    );
    return {
      result: room,
      event: {
        action: 'room.created',
        targetType: 'room',
        targetId: room.id,
        details: snapshot(room),
      },
    };
  });
}

/**
 * Changes a room's name, site or notes.
 * @throws AppError 409 when the new name is taken.
 */
export function updateRoom(
  room: Room,
  input: UpdateRoomInput,
  audit: AuditContext,
): Promise<Room> {
  const change = definedOnly(input);
  return auditedChange(audit, roomMessages(input.name), async (transaction) => {
    const before = previousValues(room, change);
    await room.update(change, { transaction });
    return {
      result: room,
      event: {
        action: 'room.updated',
        targetType: 'room',
        targetId: room.id,
        details: { before, change },
      },
    };
  });
}

/**
 * Deletes an empty room.
 * @throws AppError 409 while units, detectors or grids are kept in it, or
 *   anything else (a study) still refers to it.
 */
export function deleteRoom(room: Room, audit: AuditContext): Promise<void> {
  return auditedChange(
    audit,
    { inUse: 'This room is in use by a study, so it cannot be deleted.' },
    async (transaction) => {
      const where = { roomId: room.id };
      const [units, detectors, grids] = await Promise.all([
        XrayUnit.count({ where, transaction }),
        Detector.count({ where, transaction }),
        Grid.count({ where, transaction }),
      ]);
      if (units + detectors + grids > 0) {
        throw conflict(
          `“${room.name}” still has ${units} X-ray unit(s), ${detectors} detector(s) and ${grids} grid(s); move or delete them first.`,
        );
      }
      const details = snapshot(room);
      await room.destroy({ transaction });
      return {
        result: undefined,
        event: {
          action: 'room.deleted',
          targetType: 'room',
          targetId: room.id,
          details,
        },
      };
    },
  );
}

/** X-ray units, optionally of one room, by name. */
export function listXrayUnits(filter: {
  roomId?: number;
}): Promise<XrayUnit[]> {
  return XrayUnit.findAll({
    where: definedOnly(filter),
    order: [['name', 'ASC']],
  });
}

/** @throws AppError 404 when there is no such unit. */
export async function findXrayUnitById(id: number): Promise<XrayUnit> {
  const unit = await XrayUnit.findByPk(id);
  if (!unit) throw notFound('X-ray unit');
  return unit;
}

const unitMessages: WriteErrorMessages = {
  duplicate: 'This room already has an X-ray unit of that name.',
  inUse: 'This X-ray unit is in use by a study, so it cannot be deleted.',
};

/**
 * Adds an X-ray unit to a room.
 * @throws AppError 400 for an unknown room, 409 for a name used in the room.
 */
export function createXrayUnit(
  input: CreateXrayUnitInput,
  audit: AuditContext,
): Promise<XrayUnit> {
  return auditedChange(
    audit,
    { duplicate: unitMessages.duplicate },
    async (transaction) => {
      await requireRoomReference(input.roomId, transaction);
      const unit = await XrayUnit.create(
        { ...input, model: input.model ?? null, serial: input.serial ?? null },
        { transaction },
      );
      return {
        result: unit,
        event: {
          action: 'xray_unit.created',
          targetType: 'xray_unit',
          targetId: unit.id,
          details: snapshot(unit),
        },
      };
    },
  );
}

/**
 * Changes an X-ray unit, including moving it to another room.
 * @throws AppError 400 for an unknown room, 409 for a name used in the room.
 */
export function updateXrayUnit(
  unit: XrayUnit,
  input: UpdateXrayUnitInput,
  audit: AuditContext,
): Promise<XrayUnit> {
  const change = definedOnly(input);
  return auditedChange(
    audit,
    { duplicate: unitMessages.duplicate },
    async (transaction) => {
      if (change.roomId !== undefined)
        await requireRoomReference(change.roomId, transaction);
      const before = previousValues(unit, change);
      await unit.update(change, { transaction });
      return {
        result: unit,
        event: {
          action: 'xray_unit.updated',
          targetType: 'xray_unit',
          targetId: unit.id,
          details: { before, change },
        },
      };
    },
  );
}

/** @throws AppError 409 when a study still refers to the unit. */
export function deleteXrayUnit(
  unit: XrayUnit,
  audit: AuditContext,
): Promise<void> {
  return auditedChange(audit, unitMessages, async (transaction) => {
    const details = snapshot(unit);
    await unit.destroy({ transaction });
    return {
      result: undefined,
      event: {
        action: 'xray_unit.deleted',
        targetType: 'xray_unit',
        targetId: unit.id,
        details,
      },
    };
  });
}

/** Detectors, optionally of one room, by name. */
export function listDetectors(filter: {
  roomId?: number;
}): Promise<Detector[]> {
  return Detector.findAll({
    where: definedOnly(filter),
    order: [['name', 'ASC']],
  });
}

/** @throws AppError 404 when there is no such detector. */
export async function findDetectorById(id: number): Promise<Detector> {
  const detector = await Detector.findByPk(id);
  if (!detector) throw notFound('detector');
  return detector;
}

const detectorMessages: WriteErrorMessages = {
  duplicate: 'This room already has a detector of that name.',
  inUse: 'This detector is in use by a study, so it cannot be deleted.',
};

/**
 * Adds a detector to a room.
 * @throws AppError 400 for an unknown room, 409 for a name used in the room.
 */
export function createDetector(
  input: CreateDetectorInput,
  audit: AuditContext,
): Promise<Detector> {
  return auditedChange(
    audit,
    { duplicate: detectorMessages.duplicate },
    async (transaction) => {
      await requireRoomReference(input.roomId, transaction);
      const detector = await Detector.create(
        { ...input, model: input.model ?? null, serial: input.serial ?? null },
        { transaction },
      );
      return {
        result: detector,
        event: {
          action: 'detector.created',
          targetType: 'detector',
          targetId: detector.id,
          details: snapshot(detector),
        },
      };
    },
  );
}

/**
 * Changes a detector, including moving it to another room.
 * @throws AppError 400 for an unknown room, 409 for a name used in the room.
 */
export function updateDetector(
  detector: Detector,
  input: UpdateDetectorInput,
  audit: AuditContext,
): Promise<Detector> {
  const change = definedOnly(input);
  return auditedChange(
    audit,
    { duplicate: detectorMessages.duplicate },
    async (transaction) => {
      if (change.roomId !== undefined)
        await requireRoomReference(change.roomId, transaction);
      const before = previousValues(detector, change);
      await detector.update(change, { transaction });
      return {
        result: detector,
        event: {
          action: 'detector.updated',
          targetType: 'detector',
          targetId: detector.id,
          details: { before, change },
        },
      };
    },
  );
}

/**
 * Deletes a detector without calibration records.
 * @throws AppError 409 while it has calibration records or a study refers to it.
 */
export function deleteDetector(
  detector: Detector,
  audit: AuditContext,
): Promise<void> {
  return auditedChange(audit, detectorMessages, async (transaction) => {
    const records = await DetectorCalibration.count({
      where: { detectorId: detector.id },
      transaction,
    });
    if (records > 0) {
      throw conflict(
        `“${detector.name}” has ${records} calibration record(s); delete them first.`,
      );
    }
    const details = snapshot(detector);
    await detector.destroy({ transaction });
    return {
      result: undefined,
      event: {
        action: 'detector.deleted',
        targetType: 'detector',
        targetId: detector.id,
        details,
      },
    };
  });
}
