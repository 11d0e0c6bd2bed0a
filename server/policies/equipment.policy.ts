import type { Actor } from '../../shared/permissions.ts';

/** Every signed-in role may read the equipment register. */
export const canViewEquipment = (actor: Actor): boolean =>
  ['admin', 'physicist', 'resident', 'committee'].includes(actor.role);

/** Admins and physicists keep the register: add, change and delete. */
export const canEditEquipment = (actor: Actor): boolean =>
  actor.role === 'admin' || actor.role === 'physicist';

/** A room may go only when nothing is kept in it any more. */
export const canDeleteRoom = (
  actor: Actor,
  room: { unitCount: number; detectorCount: number; gridCount: number },
): boolean =>
  canEditEquipment(actor) &&
  room.unitCount + room.detectorCount + room.gridCount === 0;

/** A detector may go only when it has no calibration records. */
export const canDeleteDetector = (
  actor: Actor,
  detector: { calibrationCount: number },
): boolean => canEditEquipment(actor) && detector.calibrationCount === 0;
