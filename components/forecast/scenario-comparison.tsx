'use client';
import { useEffect, useMemo, useState } from 'react';
import type { Run, ScenarioInput, Summary } from '@/lib/model';
import { scenarioInputSchema } from '@/lib/model';
import { useScenarios } from '@/lib/data/scenarios';
import { MultiLineChart } from '@/components/charts/multi-line-chart';
import { SCENARIO_STYLES, dayLabel } from '@/components/charts/chart-theme';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { people, pct } from '@/components/scenarios/readings';
import { useWorkerJob } from '@/components/scenarios/use-worker-job';

interface Compared {
  id: string;
  name: string;
  input: ScenarioInput;
  run: Run;
  summary: Summary;
}

/** Figures of one compared scenario for the table. */
export function comparisonRow(c: Pick<Compared, 'input' | 'summary'>) {
  const bed = c.summary.bedDemand;
  const beds = c.input.capacity?.beds;
  let bedPeak: number | null = null;
  let over: number | null = null;
  if (bed && beds !== undefined) {
    over = 0;
    for (let k = 1; k < bed.length; k++) {
      const b = bed[k]!;
      if (bedPeak === null || b > bedPeak) bedPeak = b;
      if (b > beds) over++;
    }
  }
  return { peakDay: c.summary.peakDay, peakSize: c.summary.peakInfectious, finalSize: c.summary.finalSize, attackRate: c.summary.attackRate, bedPeak, beds, daysOver: over };
}

/** Two or more saved scenarios on one chart and side by side in a table, each re-run in a worker. */
export function ScenarioComparison({ outbreakId, startDate }: { outbreakId: string | null; startDate: string | null }) {
  const { scenarios, loading } = useScenarios(outbreakId);
  const usable = useMemo(() => scenarios.filter((s) => scenarioInputSchema.safeParse(s.input).success), [scenarios]);
  const [chosen, setChosen] = useState<string[]>([]);
  const job = useWorkerJob<Compared[]>();
  // Start with the official forecast and the newest others (up to three).
  useEffect(() => {
    if (chosen.length === 0 && usable.length >= 2) setChosen(usable.slice(0, 3).map((s) => s.id));
  }, [usable, chosen.length]);

  const compare = () => {
    const picked = usable.filter((s) => chosen.includes(s.id));
    job.start(async (c, onProgress) => {
      const out: Compared[] = [];
      for (const [i, s] of picked.entries()) {
        const input = scenarioInputSchema.parse(s.input);
        const { run, summary } = await c.forecast({ ...input, record: 'daily' });
        out.push({ id: s.id, name: s.name, input, run, summary });
        onProgress(i + 1, picked.length);
      }
      return out;
    });
  };

  const res = job.result;
  const chart = useMemo(() => {
    if (!res?.length) return null;
    const horizon = Math.max(...res.map((c) => c.input.days));
    const t = Float64Array.from({ length: horizon + 1 }, (_, k) => k);
    const series = res.map((c) => ({ label: c.name, values: Array.from(t, (_, k) => (k < c.run.I.length ? c.run.I[k]! : null)) }));
    const beds = res.map((c) => c.input.capacity?.beds).filter((b): b is number => b !== undefined);
    const bedSeries = res.filter((c) => c.summary.bedDemand).map((c) => ({
      label: c.name, values: Array.from(t, (_, k) => (k < c.summary.bedDemand!.length ? c.summary.bedDemand![k]! : null)),
    }));
    const sameBeds = beds.length > 0 && beds.every((b) => b === beds[0]) ? beds[0] : undefined;
    return { t, series, bedSeries, beds: sameBeds };
  }, [res]);

  if (!outbreakId) return <p>Choose an outbreak.</p>;
  if (loading && !scenarios.length) return <p>Loading saved scenarios…</p>;
  if (usable.length < 2) {
    return <p data-testid="compare-empty">Save at least two scenarios (for example a forecast from the fit, and the same with an intervention) to compare them here.</p>;
  }
  return (
    <div className="flex flex-col gap-3" data-testid="compare">
      <fieldset>
        <legend className="mb-1 font-bold">Scenarios to compare</legend>
        <div className="flex flex-col gap-1">
          {usable.map((s) => (
            <label key={s.id} className="flex min-h-touch items-center gap-3">
              <input type="checkbox" className="h-6 w-6 accent-[#1F6F78]" checked={chosen.includes(s.id)} data-testid="compare-choice"
                onChange={() => setChosen((c) => (c.includes(s.id) ? c.filter((x) => x !== s.id) : [...c, s.id]))} />
              <span className="font-bold">{s.name}</span>
              {s.official && <span className="rounded bg-accent px-1 text-sm text-white">official forecast</span>}
            </label>
          ))}
        </div>
      </fieldset>
      {job.status === 'running' ? (
        <p className="font-bold" aria-live="polite">Running the scenarios…</p>
      ) : (
        <div><Button onClick={compare} disabled={chosen.length < 2} data-testid="compare-run">Compare {chosen.length} scenarios</Button></div>
      )}
      {job.error && <Notice tone="error">{job.error.message}</Notice>}
      {res && chart && (
        <div className="flex flex-col gap-3" data-testid="compare-result">
          <MultiLineChart t={chart.t} series={chart.series} unit="people infectious" startDate={startDate} testId="compare-chart"
            label={`People infectious over time in ${res.length} scenarios`} />
          {chart.bedSeries.length > 0 && (
            <MultiLineChart t={chart.t} series={chart.bedSeries} unit="beds" height={220} startDate={startDate} testId="compare-beds-chart"
              limit={chart.beds !== undefined ? { value: chart.beds, label: `${people(chart.beds)} beds` } : undefined}
              label={`Beds occupied over time in ${res.length} scenarios`} />
          )}
          <div className="overflow-x-auto">
            <table className="w-full text-left" data-testid="compare-table">
              <thead>
                <tr className="border-b-2 border-ink/30 text-sm">
                  <th className="py-1 pr-3">Scenario</th>
                  <th className="py-1 pr-3">Peak day</th>
                  <th className="py-1 pr-3">Peak size</th>
                  <th className="py-1 pr-3">Final size</th>
                  <th className="py-1 pr-3">Beds at peak</th>
                  <th className="py-1">Days over capacity</th>
                </tr>
              </thead>
              <tbody>
                {res.map((c, i) => {
                  const row = comparisonRow(c);
                  const style = SCENARIO_STYLES[i % SCENARIO_STYLES.length]!;
                  return (
                    <tr key={c.id} className="border-b border-line" data-testid="compare-row">
                      <td className="py-2 pr-3 font-bold">
                        <svg aria-hidden width="28" height="10" className="mr-2 inline-block">
                          <line x1="0" y1="5" x2="28" y2="5" stroke={style.stroke} strokeWidth={style.width} strokeDasharray={style.dash?.join(' ')} />
                        </svg>
                        {c.name}
                      </td>
                      <td className="num py-2 pr-3">{dayLabel(startDate, row.peakDay)}</td>
                      <td className="num py-2 pr-3">{people(row.peakSize)}</td>
                      <td className="num py-2 pr-3">{people(row.finalSize)} ({pct(row.attackRate, 2)})</td>
                      <td className="num py-2 pr-3">{row.bedPeak === null ? '—' : `${people(row.bedPeak)} of ${people(row.beds)}`}</td>
                      <td className="num py-2">{row.daysOver === null ? '—' : row.daysOver}</td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
          <p className="text-sm text-ink/80">
            Peak size: people infectious at once. Final size: everyone infected within the horizon. Beds at peak: the most beds needed at
            once. Days over capacity: days on which more beds are needed than there are.
          </p>
        </div>
      )}
    </div>
  );
}
