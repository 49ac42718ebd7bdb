import type { Metadata } from 'next';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { listConflicts } from '@/lib/db/conflicts';
import { listOutbreaksForActor } from '@/lib/db/outbreaks';
import { MergeDesk } from '@/components/sync/merge-desk';
import { OnlineOnlyNotice } from '@/components/sync/online-only';

export const metadata: Metadata = { title: 'Merge desk' };
export const dynamic = 'force-dynamic';

type SP = Promise<Record<string, string | string[] | undefined>>;

/** Coordinators settle conflicting tallies here (online only: it reads and writes the server). */
export default async function MergePage({ searchParams }: { searchParams: SP }) {
  const actor = await getActor();
  if (!actor || !may(actor, 'merge:settle')) return <NotAllowed what="the merge desk" />;
  const sp = await searchParams;
  const outbreaks = await listOutbreaksForActor(actor);
  const wanted = typeof sp.outbreak === 'string' ? sp.outbreak : undefined;
  const outbreak = outbreaks.find((o) => o.id === wanted) ?? outbreaks[0];
  if (!outbreak) return <p>No outbreak in your scope yet.</p>;
  const show = sp.show === 'settled' ? 'settled' : 'open';
  const conflicts = await listConflicts(actor, outbreak.id, show);
  return (
    <>
      <OnlineOnlyNotice what="the merge desk" />
      <MergeDesk outbreak={{ id: outbreak.id, name: outbreak.name }} conflicts={conflicts} show={show} />
    </>
  );
}
