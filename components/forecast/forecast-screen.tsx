'use client';
import { useEffect, useMemo } from 'react';
import Link from 'next/link';
import { useOutbreak, useOutbreaks, useSites } from '@/lib/data/hooks';
import { useEpiCurve } from '@/lib/data/tallies';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import type { FitCurve, FitResult } from '@/lib/model';
import { Cautions } from '@/components/cautions';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { dayLabel } from '@/components/charts/chart-theme';
import { people } from '@/components/scenarios/readings';
import { useWorkerJob } from '@/components/scenarios/use-worker-job';
import { FitPanel } from './fit-panel';
import { ForecastPanel } from './forecast-panel';
import { GrowthPanel, RtPanel } from './growth-panel';
import { observedFromCurve } from './observed';
import { ScenarioComparison } from './scenario-comparison';

/** From the outbreak's tallies to a forecast: growth, Rt, the fit, the forecast bands, and the comparison of scenarios. */
export function ForecastScreen() {
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const { outbreak } = useOutbreak(outbreakId);
  const { curve, loading, error } = useEpiCurve(outbreakId);
  const startDate = outbreak?.startDate ?? null;
  const observed = useMemo(() => observedFromCurve(curve, startDate), [curve, startDate]);
  const fitJob = useWorkerJob<{ fit: FitResult; curve: FitCurve }>();
  // The tallies in view are those of the sites the user sees (a field officer: their teams' sites), so the
  // population at risk is theirs too; the outbreak's own figure when no site carries one.
  const { sites } = useSites(outbreakId);
  const sitePeople = sites.reduce((a, s) => a + s.population, 0);
  const population = sitePeople > 0 ? sitePeople : (outbreak?.population ?? 0);

  // The comparison is linked as #compare: scroll there once it has rendered.
  useEffect(() => {
    if (window.location.hash === '#compare' && observed) document.getElementById('compare')?.scrollIntoView();
  }, [observed]);

  if (!outbreakId) return <p>Choose an outbreak.</p>;
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1>Forecast</h1>
        {outbreak && observed && (
          <p className="text-ink/80" data-testid="forecast-cutoff">
            {outbreak.name} · day 0 is {outbreak.startDate} · data to {observed.cutoffDate ? dayLabel(startDate, observed.dataUntil) : '—'} ·{' '}
            {people(observed.casesToDate)} cases at {sites.length} sites ({people(population)} people)
          </p>
        )}
      </div>
      <Cautions compact />
      {error && <Notice tone="error">The tallies could not be loaded: {error.message}</Notice>}
      {loading && !curve && <p>Loading the tallies…</p>}
      {observed && observed.dataUntil < 3 && (
        <Notice>
          There are not yet enough complete days of tallies to estimate anything. <Link className="font-bold text-accent" href={`/entry?outbreak=${outbreakId}`}>Record tallies</Link>.
        </Notice>
      )}
      {observed && outbreak && observed.dataUntil >= 3 && (
        <>
          <Card title="Early growth"><GrowthPanel observed={observed} startDate={startDate} /></Card>
          <Card title="Rt over time"><RtPanel observed={observed} startDate={startDate} /></Card>
          <Card title="Fit a model to the tallies"><FitPanel observed={observed} population={population} job={fitJob} startDate={startDate} /></Card>
          <Card title="Forecast from the fit">
            {fitJob.result ? (
              <ForecastPanel key={fitJob.result.fit.objective} fit={fitJob.result.fit} observed={observed} outbreakId={outbreakId} beds={outbreak.beds ?? 0} startDate={startDate} />
            ) : (
              <p>Fit the model first: the forecast draws its parameters from the fit and its uncertainty.</p>
            )}
          </Card>
        </>
      )}
      <section id="compare">
        <Card title="Compare scenarios"><ScenarioComparison outbreakId={outbreakId} startDate={startDate} /></Card>
      </section>
      <Cautions />
    </div>
  );
}
