import type { Role } from '../../shared/permissions.ts';

/** Where each role lands after signing in. */
export const HOME_BY_ROLE: Record<Role, string> = {
  admin: '/admin/users',
  physicist: '/',
  resident: '/',
  committee: '/',
};
