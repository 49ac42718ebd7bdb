import { randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import { Op, QueryTypes } from 'sequelize';
import { User, TeamMembership, OutbreakMember } from '@/models';
import type { Actor } from '@/lib/auth/actor';
import type { UserRecord } from '@/lib/types/records';
import type { UserCreateInput, UserUpdateInput } from '@/lib/validation/user';
import { AppError, conflict, notFound } from '@/lib/http/errors';
import { db, writeTx } from './connection';

/** bcrypt cost: about 60 ms per hash here; enough to slow guessing, cheap for a sign-in. */
const BCRYPT_ROUNDS = 10;

let dummyHash: string | undefined;

export const hashPassword = (plain: string) => bcrypt.hash(plain, BCRYPT_ROUNDS);

/**
 * Teams and outbreaks in a user's scope: teams through live memberships, outbreaks directly
 * (coordinators, supervisors) or through those teams. Plain queries: this runs on every request.
 */
async function scopeOf(userId: string, role: string): Promise<{ teamIds: string[]; outbreakIds: string[] }> {
  const sequelize = await db();
  const select = { type: QueryTypes.SELECT, replacements: { userId } } as const;
  const [teams, direct] = await Promise.all([
    sequelize.query<{ team_id: string; outbreak_id: string }>(
      'SELECT m.team_id, t.outbreak_id FROM team_memberships m JOIN teams t ON t.id = m.team_id WHERE m.user_id = :userId AND t.deleted_at IS NULL', select),
    role === 'field' ? [] : sequelize.query<{ outbreak_id: string }>('SELECT outbreak_id FROM outbreak_members WHERE user_id = :userId', select),
  ]);
  return { teamIds: teams.map((m) => m.team_id), outbreakIds: [...new Set([...direct.map((m) => m.outbreak_id), ...teams.map((m) => m.outbreak_id)])] };
}

/** Checks a password; null for an unknown address, a wrong password or a deactivated account. */
export async function verifyCredentials(email: string, password: string): Promise<User | null> {
  await db();
  const user = await User.findOne({ where: { email: email.toLowerCase() } });
  // Compare against a fixed hash when the user is unknown so that timing does not reveal accounts.
  const hash = user?.passwordHash ?? (dummyHash ??= bcrypt.hashSync('no-such-account', BCRYPT_ROUNDS));
  const ok = await bcrypt.compare(password, hash);
  return ok && user && user.active && user.passwordHash ? user : null;
}

/**
 * The state a session is re-checked against on every request: null when the user is gone,
 * deactivated, or their session version moved on (role, teams or activity changed).
 */
export async function loadActor(userId: string, sessionVersion: number): Promise<Actor | null> {
  const sequelize = await db();
  const [user] = await sequelize.query<{ id: string; email: string; name: string; role: Actor['role']; active: boolean | number; session_version: number | string }>(
    'SELECT id, email, name, role, active, session_version FROM users WHERE id = :userId', { type: QueryTypes.SELECT, replacements: { userId } });
  if (!user || !user.active || Number(user.session_version) !== sessionVersion) return null;
  const scope = await scopeOf(user.id, user.role);
  return { id: user.id, email: user.email, name: user.name, role: user.role, ...scope };
}

async function toRecord(u: User): Promise<UserRecord> {
  const scope = await scopeOf(u.id, u.role);
  return {
    id: u.id, email: u.email, name: u.name, role: u.role, active: u.active,
    teamIds: scope.teamIds, outbreakIds: u.role === 'field' ? [] : scope.outbreakIds,
    createdAt: new Date(u.createdAt).toISOString(),
  };
}

export async function listUsers(): Promise<UserRecord[]> {
  await db();
  const users = await User.findAll({ order: [['role', 'ASC'], ['email', 'ASC']] });
  return Promise.all(users.map(toRecord));
}

export async function getUserById(id: string): Promise<UserRecord> {
  await db();
  const u = await User.findByPk(id);
  if (!u) throw notFound('User');
  return toRecord(u);
}

async function setScope(userId: string, teamIds: string[] | undefined, outbreakIds: string[] | undefined, t: import('sequelize').Transaction) {
  if (teamIds) {
    await TeamMembership.destroy({ where: { userId }, transaction: t });
    for (const teamId of new Set(teamIds)) await TeamMembership.create({ id: randomUUID(), teamId, userId }, { transaction: t });
  }
  if (outbreakIds) {
    await OutbreakMember.destroy({ where: { userId }, transaction: t });
    for (const outbreakId of new Set(outbreakIds)) await OutbreakMember.create({ id: randomUUID(), outbreakId, userId }, { transaction: t });
  }
}

export async function createUser(input: UserCreateInput): Promise<UserRecord> {
  const passwordHash = input.password ? await hashPassword(input.password) : null;
  const id = await writeTx(async (t) => {
    const existing = await User.findOne({ where: { email: input.email }, transaction: t });
    if (existing) throw new AppError('conflict', 'A user with this e-mail address already exists.', { fields: { email: 'Already in use.' } });
    const u = await User.create({ id: randomUUID(), email: input.email, name: input.name, role: input.role, passwordHash, active: true }, { transaction: t });
    await setScope(u.id, input.teamIds, input.outbreakIds, t);
    return u.id;
  });
  return getUserById(id);
}

/** Changes role, teams or activity; bumps the session version so open sessions are re-checked. */
export async function updateUser(id: string, input: UserUpdateInput): Promise<UserRecord> {
  await writeTx(async (t) => {
    const u = await User.findByPk(id, { transaction: t });
    if (!u) throw notFound('User');
    // The last active administrator may not be deactivated or given another role: nobody could then
    // manage users again (short of editing the database). Checked inside the write, so two admins
    // demoting each other at once cannot both succeed.
    const leavesAdmin = u.role === 'admin' && u.active && ((input.role !== undefined && input.role !== 'admin') || input.active === false);
    if (leavesAdmin && (await User.count({ where: { role: 'admin', active: true, id: { [Op.ne]: id } }, transaction: t })) === 0) {
      throw conflict('Ebbcast needs at least one active administrator: make another user an administrator before changing this one.');
    }
    const scopeChanged = input.role !== undefined || input.active !== undefined || input.teamIds || input.outbreakIds;
    await u.update(
      { ...(input.name ? { name: input.name } : {}), ...(input.role ? { role: input.role } : {}),
        ...(input.active !== undefined ? { active: input.active } : {}),
        ...(scopeChanged ? { sessionVersion: u.sessionVersion + 1 } : {}) },
      { transaction: t },
    );
    await setScope(id, input.teamIds, input.outbreakIds, t);
  });
  return getUserById(id);
}

export async function setPassword(userId: string, plain: string): Promise<void> {
  const passwordHash = await hashPassword(plain);
  await writeTx(async (t) => {
    const u = await User.findByPk(userId, { transaction: t });
    if (!u) throw notFound('User');
    await u.update({ passwordHash, sessionVersion: u.sessionVersion + 1 }, { transaction: t });
  });
}

export async function findUserIdByEmail(email: string): Promise<string | null> {
  await db();
  const u = await User.findOne({ where: { email: email.toLowerCase() }, attributes: ['id'] });
  return u?.id ?? null;
}

/** Users responsible for an outbreak with the given role (e.g. its coordinators, for mail). */
export async function listOutbreakMembers(outbreakId: string, role: string): Promise<UserRecord[]> {
  await db();
  const members = await OutbreakMember.findAll({ where: { outbreakId } });
  const users = await User.findAll({ where: { id: { [Op.in]: members.map((m) => m.userId) }, role, active: true } });
  return Promise.all(users.map(toRecord));
}
