import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { listOutbreaksForActor, listSitesByOutbreak, listTeamsByOutbreak } from '@/lib/db/outbreaks';
import { ManageOutbreaks } from '@/components/manage/manage-outbreaks';
import { InvitePanel } from '@/components/mail/invite-panel';

export const metadata: Metadata = { title: 'Outbreaks & sites' };
export const dynamic = 'force-dynamic';

export default async function ManagePage() {
  const actor = await getActor();
  if (!actor || !may(actor, 'outbreak:manage')) return <NotAllowed what="managing outbreaks and sites" />;
  const outbreaks = await listOutbreaksForActor(actor);
  const details = await Promise.all(
    outbreaks.map(async (o) => ({ outbreak: o, teams: await listTeamsByOutbreak(actor, o.id), sites: await listSitesByOutbreak(actor, o.id) })),
  );
  return <><ManageOutbreaks initial={details} /><InvitePanel /></>;
}
