import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { authorize } from '@/lib/auth/permissions';
import { listUsers } from '@/lib/db/users';
import { listAllTeams } from '@/lib/db/teams';
import { UsersAdmin } from '@/components/admin/users-admin';

export const metadata: Metadata = { title: 'Users' };
export const dynamic = 'force-dynamic';

export default async function AdminPage() {
  const actor = await getActor();
  authorize(actor, 'user:manage');
  const [users, teams] = await Promise.all([listUsers(), listAllTeams()]);
  return <UsersAdmin users={users} teams={teams} />;
}
