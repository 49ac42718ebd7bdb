import { createHash, randomBytes, randomUUID } from 'node:crypto';
import { Op, type Transaction } from 'sequelize';
import { MailToken } from '@/models';
import { AppError } from '@/lib/http/errors';

/** Invitation links last 72 hours; reset links one hour (issue 7). */
export const INVITE_TTL_MS = 72 * 60 * 60 * 1000;
export const RESET_TTL_MS = 60 * 60 * 1000;

export type TokenKind = 'invite' | 'reset';

export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex');

/**
 * Makes a new link token for a user, inside the caller's transaction, and retires any earlier
 * unused token of the same kind (only the newest link works). Returns the token itself: it goes
 * into the message and is never stored.
 */
export async function issueToken(
  t: Transaction,
  kind: TokenKind,
  userId: string,
  createdBy: string | null,
  now = new Date(),
): Promise<{ token: string; expiresAt: Date }> {
  await MailToken.update({ usedAt: now }, { where: { userId, kind, usedAt: null }, transaction: t });
  const token = randomBytes(32).toString('base64url');
  const expiresAt = new Date(now.getTime() + (kind === 'invite' ? INVITE_TTL_MS : RESET_TTL_MS));
  await MailToken.create({ id: randomUUID(), kind, tokenHash: hashToken(token), userId, createdBy, expiresAt, usedAt: null }, { transaction: t });
  return { token, expiresAt };
}

export type TokenRefusal = 'unknown' | 'used' | 'expired';

const REFUSAL: Record<TokenKind, Record<TokenRefusal, string>> = {
  invite: {
    unknown: 'This invitation link is not valid. Ask the person who invited you to send a new one.',
    used: 'This invitation link has already been used or replaced by a newer one. Sign in, or ask for a new invitation.',
    expired: 'This invitation link has expired (links last 72 hours). Ask the person who invited you to send a new one.',
  },
  reset: {
    unknown: 'This reset link is not valid. Ask for a new one on the "Forgot password" page.',
    used: 'This reset link has already been used or replaced by a newer one. Ask for a new one if you still need it.',
    expired: 'This reset link has expired (links last one hour). Ask for a new one on the "Forgot password" page.',
  },
};

export function refusal(kind: TokenKind, reason: TokenRefusal): AppError {
  return new AppError('bad_request', REFUSAL[kind][reason], { detail: { reason } });
}

/** The live token row for a link, or a refusal naming why it does not work. */
export async function findLiveToken(kind: TokenKind, token: string, t?: Transaction, now = new Date()): Promise<MailToken> {
  const row = await MailToken.findOne({ where: { tokenHash: hashToken(token), kind }, transaction: t });
  if (!row) throw refusal(kind, 'unknown');
  if (row.usedAt) throw refusal(kind, 'used');
  if (new Date(row.expiresAt).getTime() <= now.getTime()) throw refusal(kind, 'expired');
  return row;
}

/**
 * Marks a token used inside the caller's transaction. The update is conditional on it being
 * unused, so two tabs submitting the same link at once cannot both succeed.
 */
export async function consumeToken(t: Transaction, row: MailToken, now = new Date()): Promise<void> {
  const [n] = await MailToken.update({ usedAt: now }, { where: { id: row.id, usedAt: null, expiresAt: { [Op.gt]: now } }, transaction: t });
  if (n !== 1) throw refusal(row.kind, 'used');
}
