import { createHash, randomBytes } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { AppError } from '../errors.ts';
import {
  AccountToken,
  type TokenPurpose,
} from '../models/account-token.model.ts';

/** How long a link stays valid. Invitations are slower to be acted on. */
export const TOKEN_LIFETIME_MS: Record<TokenPurpose, number> = {
  invitation: 7 * 24 * 3600 * 1000,
  password_reset: 60 * 60 * 1000,
};

const hashToken = (token: string): string =>
  createHash('sha256').update(token).digest('hex');

/**
 * Creates a single-use token for a user and voids their earlier unused ones
 * of the same purpose. Returns the plain token, which is never stored.
 */
export async function issueToken(
  userId: number,
  purpose: TokenPurpose,
  transaction?: Transaction,
): Promise<string> {
  const token = randomBytes(32).toString('base64url');
  await AccountToken.update(
    { usedAt: new Date() },
    { where: { userId, purpose, usedAt: null }, transaction },
  );
  await AccountToken.create(
    {
      userId,
      purpose,
      tokenHash: hashToken(token),
      expiresAt: new Date(Date.now() + TOKEN_LIFETIME_MS[purpose]),
      usedAt: null,
    },
    { transaction },
  );
  return token;
}

/**
 * Finds a usable token; with a transaction it locks the row so two requests
 * cannot both spend it.
 * @throws AppError 400 token_invalid (unknown or used), token_expired.
 */
export async function findUsableToken(
  token: string,
  transaction?: Transaction,
): Promise<AccountToken> {
  const row = await AccountToken.findOne({
    where: { tokenHash: hashToken(token) },
    transaction,
    lock: transaction ? transaction.LOCK.UPDATE : undefined,
  });
  if (!row || row.usedAt) {
    throw new AppError(
      400,
      'token_invalid',
      'This link is not valid or has already been used. Ask for a new one.',
    );
  }
  if (row.expiresAt.getTime() < Date.now()) {
    throw new AppError(
      400,
      'token_expired',
      'This link has expired. Ask for a new one.',
    );
  }
  return row;
}

/** Removes tokens that expired more than a day ago. */
export async function pruneExpiredTokens(): Promise<number> {
  return AccountToken.destroy({
    where: { expiresAt: { [Op.lt]: new Date(Date.now() - 24 * 3600 * 1000) } },
  });
}
