import {
  canManageUsers,
  canReadSentMail,
  type Actor,
} from '../../shared/permissions.ts';
import type { SessionDto } from '../../shared/schemas/auth.schema.ts';
import { canEditEquipment } from './equipment.policy.ts';
import { canCreateStudy, canSignStudies } from './study.policy.ts';

/** May the actor change this particular user? Admins, but not themselves. */
export const canEditUser = (actor: Actor, target: { id: number }): boolean =>
  canManageUsers(actor) && actor.id !== target.id;

/** The capability flags the client uses to show or hide controls. */
export function sessionCapabilities(actor: Actor): SessionDto['can'] {
  return {
    manageUsers: canManageUsers(actor),
    readSentMail: canReadSentMail(actor),
    editEquipment: canEditEquipment(actor),
    editStudies: canCreateStudy(actor),
    signStudies: canSignStudies(actor),
  };
}
