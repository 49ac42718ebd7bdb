'use client';
import { useMemo } from 'react';
import { latinHypercube, mulberry32, type EnsembleResult, type ParamSample, type ScenarioInput } from '@/lib/model';
import { BandChart } from '@/components/charts/band-chart';
import { dayLabel } from '@/components/charts/chart-theme';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/notice';
import { useScenarioEditor, type EnsembleSettings } from '@/lib/stores/scenario-editor';
import { NumberField } from './number-field';
import { ProgressBar } from './progress-bar';
import { Figure } from './figure';
import { people, range } from './readings';
import { useWorkerJob } from './use-worker-job';

/**
 * Parameter draws by Latin hypercube over R0, the infectious period and (with an intervention) the
 * first intervention's contact cut: R0 and the period are drawn uniformly themselves, so β = R0/D
 * and γ = 1/D follow from each draw (a range on β alone would not keep R0 uniform).
 */
export function drawSamples(input: ScenarioInput, s: EnsembleSettings, seed: number): ParamSample[] {
  const withCut = (input.interventions?.length ?? 0) > 0;
  const dims = withCut ? 3 : 2;
  const u = latinHypercube(s.runs, dims, mulberry32(seed));
  const lerp = (r: [number, number], x: number) => r[0] + (r[1] - r[0]) * x;
  const out: ParamSample[] = [];
  for (let i = 0; i < s.runs; i++) {
    const R0 = lerp(s.R0, u[i * dims]!);
    const D = lerp(s.infectiousPeriod, u[i * dims + 1]!);
    const p: Record<string, number> = { 'params.beta': R0 / D, 'params.gamma': 1 / D };
    if (withCut) p['interventions.0.contactReduction'] = Math.min(1, Math.max(0, lerp(s.contactReduction, u[i * dims + 2]!)));
    out.push(p);
  }
  return out;
}

function rangeError(r: [number, number], min: number): string | undefined {
  if (!(r[0] >= min) || !(r[1] >= r[0])) return `from must be ≥ ${min} and ≤ to`;
  return undefined;
}

/** The ensemble: ranges, runs, a moving progress bar with Cancel, and the bands. */
export function EnsemblePanel({ input, startDate }: { input: ScenarioInput | null; startDate?: string | null }) {
  const settings = useScenarioEditor((s) => s.ensemble);
  const setEnsemble = useScenarioEditor((s) => s.setEnsemble);
  const job = useWorkerJob<{ result: EnsembleResult; input: ScenarioInput }>();
  const withCut = (input?.interventions?.length ?? 0) > 0;
  const errors = {
    R0: rangeError(settings.R0, 0),
    period: rangeError(settings.infectiousPeriod, 0.01),
    cut: withCut ? rangeError(settings.contactReduction, 0) ?? (settings.contactReduction[1] > 1 ? 'at most 100%' : undefined) : undefined,
    runs: Number.isInteger(settings.runs) && settings.runs >= 10 && settings.runs <= 20_000 ? undefined : 'from 10 to 20,000 runs',
  };
  const valid = input !== null && !Object.values(errors).some(Boolean);
  const run = () => {
    if (!input || !valid) return;
    const samples = drawSamples(input, settings, 20240601);
    const used = input;
    job.start(async (c, onProgress) => ({ result: await c.ensembleFromSamples(used, samples, onProgress), input: used }));
  };
  const res = job.result;
  const bedsBands = res?.result.bands.bedDemand;
  const rangeField = (label: string, key: 'R0' | 'infectiousPeriod' | 'contactReduction', unit: string | undefined, err: string | undefined, scale = 1) => (
    <div className="flex flex-col gap-1">
      <span className="font-bold">{label}</span>
      <div className="flex items-center gap-2">
        <NumberField compact label="" ariaLabel={`${label} from`} value={settings[key][0]} scale={scale} testId={`ens-${key}-lo`}
          onChange={(v) => v !== undefined && setEnsemble({ [key]: [v, settings[key][1]] } as Partial<EnsembleSettings>)} />
        <span>to</span>
        <NumberField compact label="" ariaLabel={`${label} to`} value={settings[key][1]} scale={scale} testId={`ens-${key}-hi`} unit={unit}
          onChange={(v) => v !== undefined && setEnsemble({ [key]: [settings[key][0], v] } as Partial<EnsembleSettings>)} />
      </div>
      {err && <p role="alert" className="text-sm font-bold text-warning">{err}</p>}
    </div>
  );
  const bedLimit = useMemo(() => (res?.input.capacity ? { value: res.input.capacity.beds, label: `${people(res.input.capacity.beds)} beds` } : undefined), [res]);

  return (
    <div className="flex flex-col gap-3" data-testid="ensemble">
      <p className="text-sm text-ink/80">
        Runs the scenario many times with R0 and the infectious period drawn across the ranges below, to show how much the
        curve depends on them. The bands hold the middle 50% and 90% of the runs.
      </p>
      <div className="flex flex-wrap gap-4">
        {rangeField('R0', 'R0', undefined, errors.R0)}
        {rangeField('Infectious period', 'infectiousPeriod', 'days', errors.period)}
        {withCut && rangeField('First intervention cut', 'contactReduction', '%', errors.cut, 100)}
        <div className="flex flex-col gap-1">
          <span className="font-bold">Runs</span>
          <NumberField compact label="" ariaLabel="Runs" value={settings.runs} testId="ens-runs" digits={6}
            onChange={(v) => v !== undefined && setEnsemble({ runs: Math.round(v) })} />
          {errors.runs && <p role="alert" className="text-sm font-bold text-warning">{errors.runs}</p>}
        </div>
      </div>
      {job.status === 'running' ? (
        <ProgressBar progress={job.progress} label="Ensemble progress" onCancel={job.cancel} testId="ensemble-progress" />
      ) : (
        <div className="flex flex-wrap items-center gap-3">
          <Button onClick={run} disabled={!valid} data-testid="ensemble-run">Run {settings.runs.toLocaleString('en')} runs</Button>
          {job.status === 'cancelled' && <span data-testid="ensemble-cancelled" className="font-bold">Cancelled — nothing was kept from that run.</span>}
        </div>
      )}
      {job.error && <Notice tone="error">{job.error.message}</Notice>}
      {res && (
        <div className="flex flex-col gap-3" data-testid="ensemble-result">
          <BandChart t={res.result.t} bands={res.result.bands.I} unit="people infectious" startDate={startDate} testId="ensemble-chart"
            label={`Infectious people: median and bands of ${res.result.runs} runs`} />
          {bedsBands && bedLimit && (
            <BandChart t={res.result.t} bands={bedsBands} unit="beds" limit={bedLimit} startDate={startDate} height={220} testId="ensemble-beds-chart"
              label={`Bed demand: median and bands of ${res.result.runs} runs against the beds available`} />
          )}
          <div className="grid gap-x-6 md:grid-cols-2">
            <Figure testId="ens-peak-day" label="Peak day (90% of runs)" value={range([res.result.peakDay.p5, res.result.peakDay.p95], (v) => String(Math.round(v)))}
              reading={`half of the runs peak by ${dayLabel(startDate, res.result.peakDay.p50)}`} />
            <Figure testId="ens-peak" label="Peak prevalence (90% of runs)" value={range([res.result.peakInfectious.p5, res.result.peakInfectious.p95], people)}
              reading={`the median run has about ${people(res.result.peakInfectious.p50)} people infectious at the peak`} />
            {res.result.bedsExceededDay && (
              <Figure testId="ens-beds" label="Beds run out" value={`${Math.round(res.result.bedsExceededDay.share * 100)}% of runs`}
                reading={res.result.bedsExceededDay.share > 0
                  ? Number.isFinite(res.result.bedsExceededDay.p5)
                    ? `in those runs, from ${dayLabel(startDate, res.result.bedsExceededDay.p5)} at the earliest (5th percentile)`
                    : 'only in a few runs, late in the horizon'
                  : 'no run needs more beds than there are'} />
            )}
          </div>
        </div>
      )}
    </div>
  );
}
