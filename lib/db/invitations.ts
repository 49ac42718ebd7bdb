import { randomUUID } from 'node:crypto';
import { Op } from 'sequelize';
import { MailToken, Outbreak, OutbreakMember, Team, TeamMembership, User } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import { authorize } from '@/lib/auth/permissions';
import type { Role } from '@/lib/auth/roles';
import { AppError, forbidden } from '@/lib/http/errors';
import type { InvitationAcceptInput, InvitationInput } from '@/lib/validation/mail';
import { invitationMail } from '@/lib/mail/messages';
import { appUrl } from '@/lib/mail/links';
import { sendMail } from '@/lib/mail/transport';
import { db, writeTx } from './connection';
import { appendLedger } from './ledger';
import { hashPassword } from './users';
import { consumeToken, findLiveToken, issueToken } from './mail-tokens';

export interface InvitationRecord {
  userId: string;
  email: string;
  name: string;
  role: Role;
  teamIds: string[];
  outbreakIds: string[];
  /** ISO date-time. */
  expiresAt: string;
  /** Whether an earlier invitation to this address was replaced. */
  resent: boolean;
  messageId: string;
}

/** What the invitee's page shows before they choose a password. */
export interface InvitationPreview {
  email: string;
  name: string;
  role: Role;
  expiresAt: string;
}

/**
 * Checks where the invitation would place the person: coordinators invite only into the teams
 * and outbreaks they are responsible for, and never an administrator.
 */
async function checkScope(actor: Actor, input: InvitationInput): Promise<{ teams: Team[]; outbreaks: Outbreak[] }> {
  if (actor.role !== 'admin' && input.role === 'admin') throw forbidden('inviting an administrator');
  const teams = input.teamIds.length ? await Team.findAll({ where: { id: { [Op.in]: input.teamIds }, deletedAt: null } }) : [];
  if (teams.length !== new Set(input.teamIds).size) {
    throw new AppError('validation_failed', 'A chosen team does not exist.', { fields: { teamIds: 'Unknown team.' } });
  }
  const outbreaks = input.outbreakIds.length ? await Outbreak.findAll({ where: { id: { [Op.in]: input.outbreakIds }, deletedAt: null } }) : [];
  if (outbreaks.length !== new Set(input.outbreakIds).size) {
    throw new AppError('validation_failed', 'A chosen outbreak does not exist.', { fields: { outbreakIds: 'Unknown outbreak.' } });
  }
  if (actor.role !== 'admin') {
    for (const team of teams) authorize(actor, 'invite:send', { outbreakId: team.outbreakId });
    for (const o of outbreaks) authorize(actor, 'invite:send', { outbreakId: o.id });
  }
  return { teams, outbreaks };
}

/**
 * Invites a person by e-mail (issue 7): makes the account (inactive, no password) or refreshes a
 * pending one, issues a 72-hour single-use link, writes the ledger row, then sends the message.
 * An address that already has a password is refused: that person should use "Forgot password".
 */
export async function sendInvitation(actor: Actor, input: InvitationInput): Promise<InvitationRecord> {
  authorize(actor, 'invite:send');
  await db();
  const { teams, outbreaks } = await checkScope(actor, input);
  const teamIds = input.role === 'field' ? [...new Set(input.teamIds)] : [];
  const outbreakIds = input.role === 'coordinator' || input.role === 'supervisor' ? [...new Set(input.outbreakIds)] : [];

  const issued = await writeTx(async (t) => {
    let user = await User.findOne({ where: { email: input.email }, transaction: t });
    const resent = Boolean(user);
    if (user?.passwordHash) {
      throw new AppError('conflict', 'This address already has an Ebbcast account with a password. They can use "Forgot password?" on the sign-in page.', {
        fields: { email: 'Already has an account.' },
      });
    }
    if (user) {
      await user.update({ name: input.name, role: input.role, sessionVersion: user.sessionVersion + 1 }, { transaction: t });
    } else {
      user = await User.create({ id: randomUUID(), email: input.email, name: input.name, role: input.role, passwordHash: null, active: false }, { transaction: t });
    }
    await TeamMembership.destroy({ where: { userId: user.id }, transaction: t });
    for (const teamId of teamIds) await TeamMembership.create({ id: randomUUID(), teamId, userId: user.id }, { transaction: t });
    await OutbreakMember.destroy({ where: { userId: user.id }, transaction: t });
    for (const outbreakId of outbreakIds) await OutbreakMember.create({ id: randomUUID(), outbreakId, userId: user.id }, { transaction: t });
    const { token, expiresAt } = await issueToken(t, 'invite', user.id, actor.id);
    await appendLedger(t, {
      kind: 'invite',
      userId: actor.id,
      outbreakId: outbreakIds[0] ?? teams[0]?.outbreakId ?? null,
      detail: { invitedUserId: user.id, email: input.email, role: input.role, teamIds, outbreakIds, expiresAt: expiresAt.toISOString(), resent },
    });
    return { userId: user.id, token, expiresAt, resent };
  });

  const places = input.role === 'field' ? teams.map((x) => x.name) : outbreaks.map((o) => o.name);
  const link = appUrl(`/invite?token=${issued.token}`);
  let sent;
  try {
    sent = await sendMail(invitationMail({ to: input.email, name: input.name, inviterName: actor.name, role: input.role, places, link, expiresAt: issued.expiresAt }));
  } catch (err) {
    throw new AppError('unavailable', 'The invitation is saved, but the mail server did not take the message. Send the invitation again in a moment.', {
      detail: { cause: err instanceof Error ? err.message : 'unknown' },
    });
  }
  return {
    userId: issued.userId, email: input.email, name: input.name, role: input.role, teamIds, outbreakIds,
    expiresAt: issued.expiresAt.toISOString(), resent: issued.resent, messageId: sent.messageId,
  };
}

/** What a valid invitation link is for; refuses an unknown, used or expired link. */
export async function previewInvitation(token: string): Promise<InvitationPreview> {
  await db();
  const row = await findLiveToken('invite', token);
  const user = await User.findByPk(row.userId);
  if (!user) throw new AppError('bad_request', 'This invitation link is not valid.', { detail: { reason: 'unknown' } });
  return { email: user.email, name: user.name, role: user.role, expiresAt: new Date(row.expiresAt).toISOString() };
}

/**
 * Uses an invitation link: sets the password, activates the account, spends the link, and writes
 * the ledger row, all in one transaction. Returns the address, for the sign-in that follows.
 */
export async function acceptInvitation(input: InvitationAcceptInput): Promise<{ email: string }> {
  await db();
  await findLiveToken('invite', input.token); // refuse early, before the slow hash
  const passwordHash = await hashPassword(input.password);
  return writeTx(async (t) => {
    const row = await findLiveToken('invite', input.token, t);
    await consumeToken(t, row);
    const user = await User.findByPk(row.userId, { transaction: t });
    if (!user) throw new AppError('bad_request', 'This invitation link is not valid.', { detail: { reason: 'unknown' } });
    await user.update(
      { passwordHash, active: true, sessionVersion: user.sessionVersion + 1, ...(input.name ? { name: input.name } : {}) },
      { transaction: t },
    );
    await appendLedger(t, { kind: 'invite_accepted', userId: user.id, detail: { email: user.email, role: user.role, invitedBy: row.createdBy } });
    return { email: user.email };
  });
}

/** Open invitations the actor may see (admins: all; coordinators: their outbreaks'), newest first. */
export async function listPendingInvitations(actor: Actor): Promise<Array<{ userId: string; email: string; name: string; role: Role; expiresAt: string; expired: boolean }>> {
  authorize(actor, 'invite:send');
  await db();
  const rows = await MailToken.findAll({ where: { kind: 'invite', usedAt: null }, order: [['createdAt', 'DESC']], limit: 500 });
  const users = await User.findAll({ where: { id: { [Op.in]: rows.map((r) => r.userId) } } });
  const out = [];
  for (const r of rows) {
    const u = users.find((x) => x.id === r.userId);
    if (!u || u.passwordHash) continue;
    if (actor.role !== 'admin') {
      const mine = await TeamMembership.count({ where: { userId: u.id }, include: [{ model: Team, where: { outbreakId: { [Op.in]: actor.outbreakIds } } }] })
        + (await OutbreakMember.count({ where: { userId: u.id, outbreakId: { [Op.in]: actor.outbreakIds } } }));
      if (!mine) continue;
    }
    out.push({ userId: u.id, email: u.email, name: u.name, role: u.role, expiresAt: new Date(r.expiresAt).toISOString(), expired: new Date(r.expiresAt) <= new Date() });
  }
  return out;
}
