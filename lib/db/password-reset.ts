import { Op } from 'sequelize';
import { MailToken, User } from '@/models';
import type { ResetConfirmInput } from '@/lib/validation/mail';
import { resetMail } from '@/lib/mail/messages';
import { appUrl } from '@/lib/mail/links';
import { sendInBackground, sendMail } from '@/lib/mail/transport';
import { db, writeTx } from './connection';
import { appendLedger } from './ledger';
import { hashPassword } from './users';
import { consumeToken, findLiveToken, issueToken, refusal } from './mail-tokens';

/** At most this many reset links per account and hour: the form cannot be used to flood a mailbox. */
export const RESET_LINKS_PER_HOUR = 3;

/**
 * "Forgot password" (issue 7). Does the same work for any address — one lookup, one transaction
 * with a ledger row — and sends the message in the background, so the answer (status, body and
 * time) does not tell whether an account exists. The caller always answers RESET_REQUEST_ANSWER.
 */
export async function requestPasswordReset(email: string, meta: { address?: string } = {}): Promise<void> {
  await db();
  const user = await User.findOne({ where: { email: email.toLowerCase() } });
  const eligible = Boolean(user && user.active);
  const since = new Date(Date.now() - 60 * 60 * 1000);
  const issued = await writeTx(async (t) => {
    let out: { token: string; expiresAt: Date } | null = null;
    let throttled = false;
    if (eligible && user) {
      const recent = await MailToken.count({ where: { userId: user.id, kind: 'reset', createdAt: { [Op.gte]: since } }, transaction: t });
      throttled = recent >= RESET_LINKS_PER_HOUR;
      if (!throttled) out = await issueToken(t, 'reset', user.id, null);
    }
    await appendLedger(t, {
      kind: 'reset_requested',
      userId: eligible && user ? user.id : null,
      detail: { email: email.toLowerCase(), known: eligible, throttled, ...(meta.address ? { address: meta.address } : {}) },
    });
    return out;
  });
  if (issued && user) {
    const link = appUrl(`/reset?token=${issued.token}`);
    sendInBackground(() => sendMail(resetMail({ to: user.email, name: user.name, link, expiresAt: issued.expiresAt })));
  }
}

/** Whether a reset link still works (for the page, before the person types a password). */
export async function checkResetToken(token: string): Promise<{ email: string; expiresAt: string }> {
  await db();
  const row = await findLiveToken('reset', token);
  const user = await User.findByPk(row.userId);
  if (!user || !user.active) throw refusal('reset', 'unknown');
  return { email: user.email, expiresAt: new Date(row.expiresAt).toISOString() };
}

/**
 * Uses a reset link: sets the new password, spends the link and signs out every other session
 * (the session version moves on), with the ledger row in the same transaction.
 */
export async function confirmPasswordReset(input: ResetConfirmInput): Promise<{ email: string }> {
  await db();
  await findLiveToken('reset', input.token);
  const passwordHash = await hashPassword(input.password);
  return writeTx(async (t) => {
    const row = await findLiveToken('reset', input.token, t);
    await consumeToken(t, row);
    const user = await User.findByPk(row.userId, { transaction: t });
    if (!user || !user.active) throw refusal('reset', 'unknown');
    await user.update({ passwordHash, sessionVersion: user.sessionVersion + 1 }, { transaction: t });
    await appendLedger(t, { kind: 'reset_done', userId: user.id, detail: { email: user.email } });
    return { email: user.email };
  });
}
