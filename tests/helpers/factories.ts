import { randomUUID } from 'node:crypto';
import { hashPassword } from '../../server/auth/password.ts';
import { User } from '../../server/models/user.model.ts';
import type { Role } from '../../shared/permissions.ts';

export const TEST_PASSWORD = 'correct horse battery';

// scrypt at production cost takes a noticeable fraction of a second; one hash
// of the shared test password serves every user a test builds.
let testPasswordHash: Promise<string> | null = null;

/** A unique address, so tests never depend on what other tests created. */
export const uniqueEmail = (label: string): string =>
  `${label}.${randomUUID().slice(0, 8)}@test.saltmarsh-general.example`;

/** Creates an active user (password TEST_PASSWORD) of the role. */
export async function buildUser(
  options: { role?: Role; disabled?: boolean; invited?: boolean } = {},
): Promise<User> {
  testPasswordHash ??= hashPassword(TEST_PASSWORD);
  const role = options.role ?? 'resident';
  return User.create({
    email: uniqueEmail(role),
    displayName: `Test ${role}`,
    role,
    passwordHash: options.invited ? null : await testPasswordHash,
    disabledAt: options.disabled ? new Date() : null,
  });
}
