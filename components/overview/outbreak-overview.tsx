'use client';
import Link from 'next/link';
import { useMemo } from 'react';
import { estimateRt, growthRateFromCounts } from '@/lib/model';
import { useOutbreak, useOutbreaks, useSites } from '@/lib/data/hooks';
import { useScenarios } from '@/lib/data/scenarios';
import { useEpiCurve } from '@/lib/data/tallies';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { scenarioNotesSchema } from '@/lib/validation/scenario-record';
import { Cautions } from '@/components/cautions';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { dayLabel } from '@/components/charts/chart-theme';
import { Figure } from '@/components/scenarios/figure';
import { fmt, people, range, readDoubling, readGrowth, readRt } from '@/components/scenarios/readings';
import { observedFromCurve } from '@/components/forecast/observed';

/** Serial interval assumed for the overview's Rt, days (mean, sd): an influenza-like illness. */
const SI = { siMean: 2.6, siSd: 1.5 };

/** The screen a coordinator opens first: the outbreak at a glance, each figure with a plain reading. */
export function OutbreakOverview() {
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const { outbreak } = useOutbreak(outbreakId);
  const { sites } = useSites(outbreakId);
  const { curve } = useEpiCurve(outbreakId);
  const { scenarios } = useScenarios(outbreakId);
  const startDate = outbreak?.startDate ?? null;
  const observed = useMemo(() => observedFromCurve(curve, startDate), [curve, startDate]);

  const growth = useMemo(() => {
    if (!observed || observed.dataUntil < 2) return null;
    const to = observed.dataUntil;
    const from = Math.max(observed.firstCaseDay ?? 0, to - 13);
    try {
      return { ...growthRateFromCounts(observed.incidence, { from, to }), from, to };
    } catch {
      return null;
    }
  }, [observed]);
  const rt = useMemo(() => {
    if (!observed) return null;
    try {
      return estimateRt(observed.incidence, { ...SI, window: 7 }).at(-1) ?? null;
    } catch {
      return null;
    }
  }, [observed]);
  const forecast = useMemo(() => {
    for (const s of scenarios) {
      const n = scenarioNotesSchema.safeParse(s.notes);
      if (n.success && n.data.forecast) return { scenario: s, notes: n.data };
    }
    return null;
  }, [scenarios]);

  if (!outbreak) return <p>Choose an outbreak.</p>;
  const q = `?outbreak=${outbreak.id}`;
  const f = forecast?.notes.forecast;
  const beds = outbreak.beds;
  return (
    <div className="flex flex-col gap-4">
      <div>
        <h1>{outbreak.name}</h1>
        <p className="text-ink/80">
          {outbreak.disease} · {outbreak.area} · day 0 is {outbreak.startDate} · {sites.length} sites, {people(sites.reduce((a, s) => a + s.population, 0))} people
        </p>
      </div>
      <Cautions compact />
      <div className="grid gap-4 md:grid-cols-2">
        <Card title="The counts">
          <div data-testid="overview-counts">
            <Figure testId="ov-cases" label="Cases to date" value={observed ? people(observed.casesToDate) : '—'}
              reading={observed ? `new cases counted at the sites since ${outbreak.startDate}` : 'no tallies yet'} />
            <Figure testId="ov-cutoff" label="Data cut-off" value={observed?.cutoffDate ? dayLabel(startDate, observed.dataUntil) : 'no complete day yet'}
              reading="the last day most sites have reported; later days are still coming in and are left out of the estimates" />
            {growth ? (
              <>
                <Figure testId="ov-growth" label="Growth, last 14 days (95% interval)" value={`${fmt(growth.r)} per day (${range(growth.interval)})`} reading={readGrowth(growth.r)} />
                <Figure testId="ov-doubling" label="Doubling time" value={growth.r > 0 ? `${fmt(growth.doublingTime)} days (${range(growth.doublingInterval)})` : 'not doubling'}
                  reading={readDoubling(growth.r > 0 ? growth.doublingTime : null, 'over the last 14 days')} />
              </>
            ) : (
              <p className="py-2">Not enough complete days for a growth rate yet.</p>
            )}
            {rt && (
              <Figure testId="ov-rt" label={`Current Rt (${dayLabel(startDate, rt.day)}, 95% interval)`} value={`${fmt(rt.mean)} (${range([rt.lo, rt.hi])})`}
                reading={readRt(rt.mean, rt.lo, rt.hi)} />
            )}
          </div>
        </Card>
        <Card title={forecast?.scenario.official ? 'Official forecast' : 'Latest forecast'}>
          {forecast && f ? (
            <div data-testid="overview-forecast">
              <p className="mb-1 text-sm text-ink/80">
                “{forecast.scenario.name}”{forecast.scenario.official ? ', published' : ', saved'} {forecast.scenario.updatedAt.slice(0, 10)}
                {forecast.notes.fit && <> from data to {dayLabel(startDate, forecast.notes.fit.dataUntil)}</>}; {f.runs.toLocaleString('en')} runs.
                {!forecast.scenario.official && ' Not yet published as the official forecast.'}
              </p>
              <Figure testId="ov-peak" label="Peak (90% range)" value={dayLabel(startDate, f.peakDay)}
                reading={`most likely around ${dayLabel(startDate, f.peakDay)}; in 90% of runs between day ${Math.round(f.peakDayRange[0])} and day ${Math.round(f.peakDayRange[1])}`} />
              <Figure testId="ov-peak-size" label="People ill at once at the peak" value={`${people(f.peakInfectious)} (${range(f.peakInfectiousRange, people)})`}
                reading="the most people infectious at the same time" />
              {f.bedPeak !== null && (
                <Figure testId="ov-beds" label="Most beds needed" value={`${people(f.bedPeak)} (${range(f.bedPeakRange, people)})`}
                  tone={beds !== null && f.bedPeak > beds ? 'warning' : undefined}
                  reading={beds === null ? 'beds available are not recorded for this outbreak' : f.bedPeak > beds ? `more than the ${people(beds)} beds available` : `within the ${people(beds)} beds available`} />
              )}
              {f.bedsExceededShare !== null && (
                <Figure testId="ov-beds-exceeded" label="Beds run out" value={f.bedsExceededDay !== null ? dayLabel(startDate, f.bedsExceededDay) : f.bedsExceededShare === 0 ? 'never in the horizon' : 'not in most runs'}
                  tone={f.bedsExceededShare > 0.5 ? 'warning' : undefined}
                  reading={f.bedsExceededShare === 0 ? 'in no run does demand exceed the beds' : `in ${Math.round(f.bedsExceededShare * 100)}% of runs${f.bedsExceededRange?.[0] != null ? `, from ${dayLabel(startDate, f.bedsExceededRange[0])} at the earliest` : ''}`} />
              )}
            </div>
          ) : (
            <p data-testid="overview-no-forecast">No forecast saved yet. Fit the tallies and save or publish a forecast on the forecast screen.</p>
          )}
        </Card>
      </div>
      {forecast?.notes.fit?.flags.length ? <Notice tone="caution"><p className="font-bold">About the fit behind this forecast</p><ul className="list-disc pl-5">{forecast.notes.fit.flags.map((w) => <li key={w}>{w}</li>)}</ul></Notice> : null}
      <div className="flex flex-wrap gap-3">
        <Link href={`/forecast${q}`} data-testid="overview-to-forecast" className="min-h-touch rounded-lg bg-accent px-4 py-2 font-bold text-white no-underline">Fit and forecast</Link>
        <Link href={`/scenarios${q}`} className="min-h-touch rounded-lg border-2 border-ink/30 bg-panel px-4 py-2 font-bold text-ink no-underline">Scenarios</Link>
        <Link href={`/forecast${q}#compare`} className="min-h-touch rounded-lg border-2 border-ink/30 bg-panel px-4 py-2 font-bold text-ink no-underline">Compare scenarios</Link>
      </div>
      <Cautions />
    </div>
  );
}
