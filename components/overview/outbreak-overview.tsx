'use client';
import { useOutbreak, useSites } from '@/lib/data/hooks';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { useOutbreaks } from '@/lib/data/hooks';
import { Card } from '@/components/ui/card';
import { Cautions } from '@/components/cautions';

/** The screen a coordinator opens first: the outbreak at a glance. */
export function OutbreakOverview() {
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const { outbreak } = useOutbreak(outbreakId);
  const { sites } = useSites(outbreakId);
  if (!outbreak) return <p>Choose an outbreak.</p>;
  return (
    <div className="flex flex-col gap-4">
      <h1>{outbreak.name}</h1>
      <p>{outbreak.disease} · {outbreak.area} · day 0 {outbreak.startDate}</p>
      <Card title="Sites">
        <p><span className="num">{sites.length}</span> sites, <span className="num">{sites.reduce((a, s) => a + s.population, 0).toLocaleString()}</span> people.</p>
      </Card>
      <Cautions />
    </div>
  );
}
