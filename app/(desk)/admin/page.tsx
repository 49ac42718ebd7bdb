import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { listUsers } from '@/lib/db/users';
import { listAllTeams } from '@/lib/db/teams';
import { UsersAdmin } from '@/components/admin/users-admin';
import { InvitePanel } from '@/components/mail/invite-panel';

export const metadata: Metadata = { title: 'Users' };
export const dynamic = 'force-dynamic';

export default async function AdminPage() {
  const actor = await getActor();
  if (!actor || !may(actor, 'user:manage')) return <NotAllowed what="user administration" />;
  const [users, teams] = await Promise.all([listUsers(), listAllTeams()]);
  return <><UsersAdmin users={users} teams={teams} /><InvitePanel /></>;
}
