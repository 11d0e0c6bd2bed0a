import type { Actor } from '../../shared/permissions.ts';
import type { UserDto } from '../../shared/schemas/auth.schema.ts';
import type { User } from '../models/user.model.ts';
import { canEditUser } from '../policies/account.policy.ts';

/** The fields of a user the client may see; never the password hash. */
export function presentUser(user: User, viewer: Actor): UserDto {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    role: user.role,
    status: user.disabledAt
      ? 'disabled'
      : user.passwordHash
        ? 'active'
        : 'invited',
    createdAt: user.createdAt.toISOString(),
    permissions: { edit: canEditUser(viewer, user) },
  };
}
