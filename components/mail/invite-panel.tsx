import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { ROLES, type Role } from '@/lib/auth/roles';
import { listAllOutbreakNames, listAllTeams } from '@/lib/db/teams';
import { listOutbreaksForActor, listTeamsByOutbreak } from '@/lib/db/outbreaks';
import { listPendingInvitations } from '@/lib/db/invitations';
import { InviteForm, type InviteTeamOption } from './invite-form';

/**
 * "Invite by e-mail" for admins (/admin: any role, any team) and coordinators (/manage: their
 * outbreaks' teams, never an administrator). Loads its own options so a page mounts it in one line.
 */
export async function InvitePanel() {
  const actor = await getActor();
  if (!actor || !may(actor, 'invite:send')) return null;
  let teams: InviteTeamOption[];
  let outbreaks: { id: string; name: string }[];
  let roles: Role[];
  if (actor.role === 'admin') {
    [teams, outbreaks] = await Promise.all([listAllTeams(), listAllOutbreakNames()]);
    roles = [...ROLES];
  } else {
    const mine = await listOutbreaksForActor(actor);
    outbreaks = mine.map((o) => ({ id: o.id, name: o.name }));
    teams = (await Promise.all(mine.map(async (o) => (await listTeamsByOutbreak(actor, o.id)).map((t) => ({ id: t.id, name: t.name, outbreakId: o.id, outbreakName: o.name }))))).flat();
    roles = ROLES.filter((r) => r !== 'admin');
  }
  const pending = await listPendingInvitations(actor);
  return <InviteForm teams={teams} outbreaks={outbreaks} roles={roles} pending={pending} />;
}
