import { QueryTypes, UniqueConstraintError } from 'sequelize';
import type {
  CompleteTokenInput,
  InviteUserInput,
  UpdateUserInput,
} from '../../shared/schemas/auth.schema.ts';
import { hashPassword, verifyPassword } from '../auth/password.ts';
import { sequelize } from '../db/sequelize.ts';
import { AppError, conflict, notFound } from '../errors.ts';
import { invitationMail, passwordResetMail } from '../mail/account-mail.ts';
import type { Mailer } from '../mail/mailer.ts';
import { User } from '../models/user.model.ts';
import { findUsableToken, issueToken } from './account-token.service.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';

/** Everything a user service call needs from the outside world. */
export interface AccountDeps {
  mailer: Mailer;
  publicUrl: string;
}

/** All users, by name. */
export function listUsers(): Promise<User[]> {
  return User.findAll({ order: [['displayName', 'ASC']] });
}

/** @throws AppError 404 when there is no such user. */
export async function findUserById(id: number): Promise<User> {
  const user = await User.findByPk(id);
  if (!user) throw notFound('user');
  return user;
}

/**
 * Creates an invited user (no password yet) and mails them a link.
 * @throws AppError 409 when the address is already registered.
 */
export async function inviteUser(
  input: InviteUserInput,
  audit: AuditContext,
  deps: AccountDeps,
): Promise<{ user: User; mailDelivered: boolean }> {
  const { user, token } = await sequelize
    .transaction(async (transaction) => {
      const created = await User.create(
        { ...input, passwordHash: null, disabledAt: null },
        { transaction },
      );
      const issued = await issueToken(created.id, 'invitation', transaction);
      await recordAudit(
        audit,
        {
          action: 'user.invited',
          targetType: 'user',
          targetId: created.id,
          details: { email: input.email, role: input.role },
        },
        transaction,
      );
      return { user: created, token: issued };
    })
    .catch((error: unknown) => {
      if (error instanceof UniqueConstraintError) {
        throw conflict('A user with this e-mail address already exists.');
      }
      throw error;
    });
  const link = `${deps.publicUrl}/welcome/${token}`;
  const mailDelivered = await deliver(
    deps.mailer,
    invitationMail({
      to: user.email,
      displayName: user.displayName,
      role: user.role,
      link,
    }),
  );
  return { user, mailDelivered };
}

async function deliver(
  mailer: Mailer,
  mail: Parameters<Mailer['send']>[0],
): Promise<boolean> {
  try {
    await mailer.send(mail);
    return true;
  } catch (error) {
    console.error('mail delivery failed:', error);
    return false;
  }
}

/** Ends every stored session of a user (sign-out everywhere). */
export async function endSessionsOf(userId: number): Promise<void> {
  await sequelize.query(
    `DELETE FROM "session" WHERE sess->'passport'->>'user' = :id`,
    { replacements: { id: String(userId) }, type: QueryTypes.DELETE },
  );
}

/**
 * Changes a user's role, name or disabled state. Disabling ends their
 * sessions. An admin cannot demote or disable themselves, so the register
 * never loses its last administrator by accident.
 */
export async function updateUser(
  user: User,
  input: UpdateUserInput,
  audit: AuditContext,
): Promise<User> {
  if (
    user.id === audit.actorId &&
    (input.disabled || (input.role && input.role !== user.role))
  ) {
    throw conflict('You cannot change your own role or disable yourself.');
  }
  await sequelize.transaction(async (transaction) => {
    const before = { role: user.role, disabled: user.disabledAt !== null };
    if (input.role) user.role = input.role;
    if (input.displayName) user.displayName = input.displayName;
    if (input.disabled !== undefined) {
      user.disabledAt = input.disabled ? (user.disabledAt ?? new Date()) : null;
    }
    await user.save({ transaction });
    await recordAudit(
      audit,
      {
        action: 'user.updated',
        targetType: 'user',
        targetId: user.id,
        details: { before, change: input },
      },
      transaction,
    );
  });
  if (input.disabled || input.role) await endSessionsOf(user.id);
  return user;
}

/**
 * Spends an invitation or reset token and sets the password it was for.
 * @throws AppError 400 token_invalid / token_expired.
 */
export async function completeToken(
  input: CompleteTokenInput,
  purpose: 'invitation' | 'password_reset',
  audit: Omit<AuditContext, 'actorId'>,
): Promise<User> {
  const passwordHash = await hashPassword(input.password);
  return sequelize.transaction(async (transaction) => {
    const token = await findUsableToken(input.token, transaction);
    if (token.purpose !== purpose) {
      throw new AppError(400, 'token_invalid', 'This link is not valid here.');
    }
    const user = await User.findByPk(token.userId, { transaction });
    if (!user || user.disabledAt) {
      throw new AppError(400, 'token_invalid', 'This account is not active.');
    }
    token.usedAt = new Date();
    await token.save({ transaction });
    user.passwordHash = passwordHash;
    await user.save({ transaction });
    await recordAudit(
      { ...audit, actorId: user.id },
      {
        action:
          purpose === 'invitation'
            ? 'user.invitation_accepted'
            : 'user.password_reset',
        targetType: 'user',
        targetId: user.id,
      },
      transaction,
    );
    return user;
  });
}

/**
 * Mails a reset link when the address belongs to an active user. Answers the
 * same either way, so the form does not reveal who has an account.
 */
export async function requestPasswordReset(
  email: string,
  audit: Omit<AuditContext, 'actorId'>,
  deps: AccountDeps,
): Promise<void> {
  const user = await User.findOne({ where: { email } });
  if (!user || user.disabledAt) return;
  const token = await sequelize.transaction(async (transaction) => {
    const issued = await issueToken(user.id, 'password_reset', transaction);
    await recordAudit(
      { ...audit, actorId: null },
      {
        action: 'user.password_reset_requested',
        targetType: 'user',
        targetId: user.id,
      },
      transaction,
    );
    return issued;
  });
  await deliver(
    deps.mailer,
    passwordResetMail({
      to: user.email,
      displayName: user.displayName,
      link: `${deps.publicUrl}/reset-password/${token}`,
    }),
  );
}

/**
 * Changes the signed-in user's own password after checking the current one.
 * @throws AppError 400 validation_failed when the current password is wrong.
 */
export async function changeOwnPassword(
  user: User,
  currentPassword: string,
  newPassword: string,
  audit: AuditContext,
): Promise<void> {
  if (
    !user.passwordHash ||
    !(await verifyPassword(currentPassword, user.passwordHash))
  ) {
    throw new AppError(
      400,
      'validation_failed',
      'The current password is not right.',
      [
        {
          path: 'currentPassword',
          message: 'The current password is not right.',
        },
      ],
    );
  }
  user.passwordHash = await hashPassword(newPassword);
  await sequelize.transaction(async (transaction) => {
    await user.save({ transaction });
    await recordAudit(
      audit,
      {
        action: 'user.password_changed',
        targetType: 'user',
        targetId: user.id,
      },
      transaction,
    );
  });
}

/** What a token link is for, so its page can greet the user. */
export async function describeToken(
  token: string,
): Promise<{ purpose: string; email: string; displayName: string }> {
  const row = await findUsableToken(token);
  const user = await findUserById(row.userId);
  return {
    purpose: row.purpose,
    email: user.email,
    displayName: user.displayName,
  };
}
