import {
  canManageUsers,
  canReadSentMail,
  type Actor,
} from '../../shared/permissions.ts';
import type { SessionDto } from '../../shared/schemas/auth.schema.ts';
import { canEditEquipment } from './equipment.policy.ts';
import { canCreateStudy, canSignStudies } from './study.policy.ts';

/** May the actor list, invite and change users? */
export const canAdministerUsers = (actor: Actor): boolean =>
  canManageUsers(actor);

/** May the actor change this particular user? Admins, but not themselves. */
export const canEditUser = (actor: Actor, target: { id: number }): boolean =>
  canManageUsers(actor) && actor.id !== target.id;

/** May the actor read the mail the app has sent? */
export const canViewSentMail = (actor: Actor): boolean =>
  canReadSentMail(actor);

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
