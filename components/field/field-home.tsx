'use client';
import Link from 'next/link';
import { useMe } from '@/lib/data/use-me';
import { useOutbreaks, useSites } from '@/lib/data/hooks';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { useUiStore } from '@/lib/stores/ui';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';

const TILES = [
  { href: '/entry', title: 'Record tallies', text: "Today's new cases per site, in a few taps." },
  { href: '/tallies', title: 'Tallies & curve', text: 'The table of counts and the epidemic curve.' },
  { href: '/scenarios', title: 'Scenarios', text: 'Run SIR-family models and compare interventions.' },
  { href: '/forecast', title: 'Forecast', text: 'Fit the tallies and project the wave, with ranges.' },
  { href: '/sync', title: 'Sync', text: 'What waits in the outbox, and the last sync.' },
];

/** A field officer's start screen: the outbreak in view, their sites, and the screens they use. */
export function FieldHome() {
  const { me, loading } = useMe();
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const setOutbreak = useUiStore((s) => s.setOutbreak);
  const { sites } = useSites(outbreakId);
  const outbreak = outbreaks.find((o) => o.id === outbreakId);

  if (!loading && !me) {
    return (
      <Notice>
        <p className="font-bold">Sign in once with a network to use Ebbcast on this device.</p>
        <Link href="/signin" className="font-bold text-accent">Sign in</Link>
      </Notice>
    );
  }
  return (
    <div className="flex flex-col gap-4">
      <h1>{outbreak ? outbreak.name : 'Field home'}</h1>
      {outbreaks.length > 1 && (
        <div className="flex flex-wrap gap-2">
          {outbreaks.map((o) => (
            <button key={o.id} type="button" onClick={() => setOutbreak(o.id)}
              className={`min-h-touch rounded-lg border-2 px-3 font-bold ${o.id === outbreakId ? 'border-accent bg-accent text-white' : 'border-line bg-panel'}`}>
              {o.name}
            </button>
          ))}
        </div>
      )}
      {outbreak && (
        <p className="text-ink/80">
          {outbreak.disease} · {outbreak.area} · day 0 {outbreak.startDate} · <span className="num">{outbreak.population.toLocaleString()}</span> people
        </p>
      )}
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
        {TILES.map((t) => (
          <Link key={t.href} href={outbreakId && t.href !== '/sync' ? `${t.href}?outbreak=${outbreakId}` : t.href}
            className="rounded-xl border-2 border-line bg-panel p-4 text-ink no-underline hover:border-accent">
            <h2 className="text-accent">{t.title}</h2>
            <p>{t.text}</p>
          </Link>
        ))}
      </div>
      <Card title="Your sites">
        {sites.length === 0 ? (
          <p>No sites yet.</p>
        ) : (
          <ul data-testid="my-sites" className="grid gap-2 sm:grid-cols-2">
            {sites.map((s) => (
              <li key={s.id} className="flex justify-between rounded-lg border border-line px-3 py-2">
                <span className="font-bold">{s.name}</span>
                <span className="num text-ink/70">{s.population.toLocaleString()} people</span>
              </li>
            ))}
          </ul>
        )}
      </Card>
    </div>
  );
}
