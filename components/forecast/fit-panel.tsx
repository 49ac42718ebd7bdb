'use client';
import { useState } from 'react';
import type { FitCurve, FitInput, FitParamName, FitResult } from '@/lib/model';
import { FitChart } from '@/components/charts/fit-chart';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { NumberField } from '@/components/scenarios/number-field';
import { fmt, people, range, readR0 } from '@/components/scenarios/readings';
import type { useWorkerJob } from '@/components/scenarios/use-worker-job';
import type { Observed } from './observed';

export type FitJob = ReturnType<typeof useWorkerJob<{ fit: FitResult; curve: FitCurve }>>;

/** The fit's flags in plain words; codes without a plain version keep the engine's message. */
const FLAG_WORDS: Partial<Record<string, string>> = {
  few_informative_days: 'Few days carry cases: the fit rests on little data, so its ranges are wide.',
  before_peak: 'The counts have not peaked yet: when the wave peaks, and how big it gets, are poorly pinned down — read the ranges.',
  not_converged: 'The fit did not settle on one best answer: treat its figures as rough.',
  overdispersed: 'The counts vary more from day to day than the model expects: the ranges are likely too narrow.',
  interval_open: 'For at least one parameter the data set no limit on one side: that end of its range is open.',
};

export function flagWords(fit: Pick<FitResult, 'flags'>): string[] {
  return fit.flags.map((f) => FLAG_WORDS[f.code] ?? f.message);
}

/**
 * Builds the FitInput: incidence on reported days from day 1 to the cut-off. Day 0 is not a count
 * the model can produce (its incidence covers the day before day 0); its cases start I at day 0.
 */
export function fitInputFor(o: Observed, population: number, opts: { model: 'SIR' | 'SEIR'; estimate: FitParamName[]; period: number; latent: number }): FitInput {
  const day: number[] = [];
  const value: number[] = [];
  for (let d = 1; d <= o.dataUntil; d++) {
    if (o.reported[d] || (o.incidence[d] ?? 0) > 0) {
      day.push(d);
      value.push(o.incidence[d] ?? 0);
    }
  }
  const firstCases = o.firstCaseDay !== null ? (o.incidence[o.firstCaseDay] ?? 1) : 1;
  return {
    model: opts.model,
    population,
    initial: { I: Math.max(1, firstCases) },
    observed: { day, value },
    observe: 'incidence',
    estimate: opts.estimate,
    likelihood: 'poisson',
    params: { gamma: 1 / opts.period, ...(opts.model === 'SEIR' ? { sigma: 1 / opts.latent } : {}) },
  };
}

const PARAM_ROWS: { key: 'beta' | 'gamma' | 'I0' | 'sigma' | 'R0' | 'infectiousPeriod'; name: string; unit: string; meaning: string }[] = [
  { key: 'R0', name: 'R0', unit: '', meaning: 'others infected by one case at the start' },
  { key: 'beta', name: 'Transmission rate β', unit: 'per day', meaning: 'infections a case causes per day while all are susceptible' },
  { key: 'gamma', name: 'Recovery rate γ', unit: 'per day', meaning: '1 / infectious period' },
  { key: 'infectiousPeriod', name: 'Infectious period', unit: 'days', meaning: 'how long a case passes it on' },
  { key: 'sigma', name: 'Onset rate σ', unit: 'per day', meaning: '1 / latent period' },
  { key: 'I0', name: 'Infectious at day 0', unit: 'people', meaning: 'where the wave started from' },
];

/** Fit settings, the run in a worker (Cancel), the parameters with intervals, flags, and the fit over the data. */
export function FitPanel({ observed, population, job, startDate }: { observed: Observed; population: number; job: FitJob; startDate: string | null }) {
  const [model, setModel] = useState<'SIR' | 'SEIR'>('SIR');
  const [estimate, setEstimate] = useState<FitParamName[]>(['beta', 'gamma', 'I0']);
  const [period, setPeriod] = useState(3);
  const [latent, setLatent] = useState(2);
  const toggle = (p: FitParamName) => setEstimate((e) => (e.includes(p) ? e.filter((x) => x !== p) : [...e, p]));
  const run = () => {
    const input = fitInputFor(observed, population, { model, estimate: estimate.filter((p) => p !== 'sigma' || model === 'SEIR'), period, latent });
    job.start(async (c) => {
      const fit = await c.fitScenario(input);
      return { fit, curve: await c.fitCurve(fit) };
    });
  };
  const r = job.result;
  const value = (fit: FitResult, key: (typeof PARAM_ROWS)[number]['key']): number | undefined =>
    key === 'R0' ? fit.R0 : key === 'infectiousPeriod' ? fit.infectiousPeriod : key === 'I0' ? fit.initial.I : fit.params[key];
  return (
    <div className="flex flex-col gap-3" data-testid="fit">
      <p className="text-sm text-ink/80">
        Calibrates a model to the daily new cases up to the cut-off by maximum likelihood (Poisson counts), with 95% intervals from
        the profile likelihood. Fixed values are the starting points of the fitted ones.
      </p>
      <div className="flex flex-wrap items-end gap-4">
        <fieldset className="flex flex-col gap-1">
          <legend className="font-bold">Model</legend>
          <div className="flex gap-2">
            {(['SIR', 'SEIR'] as const).map((m) => (
              <button key={m} type="button" aria-pressed={model === m} onClick={() => setModel(m)}
                className={`min-h-touch rounded-lg border-2 px-4 font-bold ${model === m ? 'border-accent bg-accent text-white' : 'border-ink/30 bg-white'}`}>{m}</button>
            ))}
          </div>
        </fieldset>
        <fieldset className="flex flex-col gap-1">
          <legend className="font-bold">Estimate</legend>
          <div className="flex flex-wrap gap-3">
            {([['beta', 'β'], ['gamma', 'γ'], ['I0', 'I at day 0'], ...(model === 'SEIR' ? [['sigma', 'σ']] : [])] as [FitParamName, string][]).map(([p, l]) => (
              <label key={p} className="flex min-h-touch items-center gap-2">
                <input type="checkbox" className="h-6 w-6 accent-[#1F6F78]" checked={estimate.includes(p)} onChange={() => toggle(p)} />
                {l}
              </label>
            ))}
          </div>
        </fieldset>
        <div className="w-40"><NumberField label="Infectious period" unit="days" value={period} onChange={(v) => v !== undefined && v > 0 && setPeriod(v)} /></div>
        {model === 'SEIR' && <div className="w-40"><NumberField label="Latent period" unit="days" value={latent} onChange={(v) => v !== undefined && v > 0 && setLatent(v)} /></div>}
      </div>
      {job.status === 'running' ? (
        <div className="flex items-center gap-3" data-testid="fit-running">
          <span className="font-bold" aria-live="polite">Fitting in the background…</span>
          <Button variant="secondary" onClick={job.cancel} data-testid="fit-cancel">Cancel</Button>
        </div>
      ) : (
        <div className="flex flex-wrap items-center gap-3">
          <Button onClick={run} disabled={estimate.length === 0 || observed.dataUntil < 3} data-testid="fit-run">
            {r ? 'Fit again' : 'Fit to the tallies'}
          </Button>
          {job.status === 'cancelled' && <span className="font-bold">Cancelled.</span>}
        </div>
      )}
      {job.error && <Notice tone="error">The fit failed: {job.error.message}</Notice>}
      {r && (
        <div className="flex flex-col gap-3" data-testid="fit-result">
          <table className="w-full text-left">
            <thead>
              <tr className="border-b border-line text-sm">
                <th className="py-1 pr-2">Parameter</th><th className="py-1 pr-2">Estimate</th><th className="py-1 pr-2">95% interval</th><th className="py-1">Meaning</th>
              </tr>
            </thead>
            <tbody>
              {PARAM_ROWS.map((row) => {
                const v = value(r.fit, row.key);
                if (v === undefined || (row.key === 'sigma' && r.fit.input.model !== 'SEIR')) return null;
                const iv = r.fit.interval[row.key];
                const fixed = !iv && row.key !== 'R0' && row.key !== 'infectiousPeriod';
                const f = row.key === 'I0' ? people : (x: number) => fmt(x);
                return (
                  <tr key={row.key} className="border-b border-line" data-testid={`fit-${row.key}`}>
                    <td className="py-1 pr-2 font-bold">{row.name}</td>
                    <td className="num py-1 pr-2 font-mono">{f(v)} {row.unit}</td>
                    <td className="num py-1 pr-2 font-mono">{iv ? range(iv, f) : fixed ? 'fixed' : '—'}</td>
                    <td className="py-1 text-sm">{row.meaning}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <p data-testid="fit-reading">R0 {fmt(r.fit.R0, 2)} — {readR0(r.fit.R0)}{r.fit.interval.R0 ? ` (95% interval ${range(r.fit.interval.R0)})` : ''}.</p>
          {r.fit.flags.length > 0 ? (
            <Notice tone="caution">
              <ul className="list-disc pl-5" data-testid="fit-flags">{flagWords(r.fit).map((w) => <li key={w}>{w}</li>)}</ul>
            </Notice>
          ) : (
            <p className="text-sm">The fit converged and raised no flags.</p>
          )}
          <FitChart trajectory={r.curve.trajectory} day={r.curve.day} observed={r.curve.observed} residual={r.curve.residual}
            residualKind={r.curve.residualKind} startDate={startDate} />
          <p className="text-sm text-ink/80">
            Bars: the tallies; line: the fitted model. Below, the residuals ({r.curve.residualKind === 'pearson' ? 'in standard deviations of a Poisson count' : 'in cases'}):
            a run of same-sign bars means the model misses a pattern in the data.
          </p>
        </div>
      )}
    </div>
  );
}
