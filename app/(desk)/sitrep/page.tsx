import type { Metadata } from 'next';
import Link from 'next/link';
import { getActor } from '@/lib/auth/session';
import { may } from '@/lib/auth/permissions';
import { NotAllowed } from '@/components/shell/not-allowed';
import { listOutbreaksForActor } from '@/lib/db/outbreaks';
import { getSitrepCached } from '@/lib/db/sitrep';
import { SitrepReport } from '@/components/sitrep/sitrep-report';
import { SitrepActions } from '@/components/sitrep/sitrep-actions';

export const metadata: Metadata = { title: 'Sitrep' };
export const dynamic = 'force-dynamic';

/** The situation report of an outbreak (`?outbreak=`), printable on A4. */
export default async function SitrepPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await getActor();
  if (!actor || !may(actor, 'sitrep:read')) return <NotAllowed what="situation reports" />;
  const sp = await searchParams;
  const outbreaks = await listOutbreaksForActor(actor);
  const wanted = typeof sp.outbreak === 'string' ? sp.outbreak : outbreaks[0]?.id;
  if (!wanted) return <p>No outbreak in your scope yet.</p>;
  if (!may(actor, 'sitrep:read', { outbreakId: wanted })) return <NotAllowed what="this outbreak's sitrep" />;
  const data = await getSitrepCached(actor, wanted);
  return (
    <div className="flex flex-col gap-4">
      {outbreaks.length > 1 && (
        <nav aria-label="Outbreaks" className="no-print flex flex-wrap gap-2">
          {outbreaks.map((o) => <Link key={o.id} href={`/sitrep?outbreak=${o.id}`} className="text-accent">{o.name}</Link>)}
        </nav>
      )}
      <SitrepActions outbreakId={wanted} canSend={may(actor, 'sitrep:send', { outbreakId: wanted })} />
      <SitrepReport data={data} />
    </div>
  );
}
