/** Lamella's roles, from most to least privileged in the account area. */
export const ROLES = ['admin', 'physicist', 'resident', 'committee'] as const;
export type Role = (typeof ROLES)[number];

/** Plain-language description of each role, shown when inviting. */
export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  admin: 'Invites users, sets roles, keeps the equipment register.',
  physicist: 'Runs and reviews studies, signs them off.',
  resident: 'Prepares studies and submits them for review; cannot sign.',
  committee: 'Reads signed studies and comparisons only.',
};

/** The minimal facts the account rules need about a user. */
export interface Actor {
  id: number;
  role: Role;
}

export const isAdmin = (actor: Actor): boolean => actor.role === 'admin';
export const canManageUsers = isAdmin;
export const canReadSentMail = isAdmin;
