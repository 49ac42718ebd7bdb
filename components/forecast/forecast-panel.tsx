'use client';
import { useMemo, useState } from 'react';
import type { FitResult, ForecastBase, ForecastResult, ScenarioInput } from '@/lib/model';
import type { ForecastNotes, ScenarioNotes } from '@/lib/validation/scenario-record';
import { BandChart } from '@/components/charts/band-chart';
import { dayLabel } from '@/components/charts/chart-theme';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { Notice } from '@/components/ui/notice';
import { Figure } from '@/components/scenarios/figure';
import { NumberField } from '@/components/scenarios/number-field';
import { ProgressBar } from '@/components/scenarios/progress-bar';
import { people, range } from '@/components/scenarios/readings';
import { useWorkerJob } from '@/components/scenarios/use-worker-job';
import { publishScenario, saveScenario } from '@/lib/data/scenarios';
import { useMe } from '@/lib/data/use-me';
import { flagWords } from './fit-panel';
import type { Observed } from './observed';

const fin = (v: number) => (Number.isFinite(v) ? v : null);

/** Largest value of a band's series. */
const maxOf = (a: Float64Array) => a.reduce((m, v) => (v > m ? v : m), -Infinity);

/** The figures of a forecast kept with a saved scenario (plain JSON; Infinity becomes null = never). */
export function forecastNotes(f: ForecastResult): ForecastNotes {
  const bed = f.bands.bedDemand;
  const ex = f.bedsExceededDay;
  return {
    runs: f.runs,
    peakDay: f.peakDay.p50,
    peakDayRange: [f.peakDay.p5, f.peakDay.p95],
    peakInfectious: f.peakInfectious.p50,
    peakInfectiousRange: [f.peakInfectious.p5, f.peakInfectious.p95],
    bedPeak: bed ? maxOf(bed.p50) : null,
    bedPeakRange: bed ? [maxOf(bed.p5), maxOf(bed.p95)] : null,
    bedsExceededDay: ex ? fin(ex.p50) : null,
    bedsExceededRange: ex ? [fin(ex.p5), fin(ex.p95)] : null,
    bedsExceededShare: ex ? ex.share : null,
  };
}

/** The scenario a forecast ran: the fitted parameters with the forecast's horizon, beds and intervention. */
export function scenarioFromFit(fit: FitResult, base: ForecastBase, step: number): ScenarioInput {
  const inp = fit.input;
  return {
    model: inp.model,
    population: inp.population,
    initial: { I: fit.initial.I, ...(inp.model === 'SEIR' ? { E: inp.initial.E } : {}), ...(inp.initial.R > 0 ? { R: inp.initial.R } : {}) },
    params: {
      beta: fit.params.beta,
      gamma: fit.params.gamma,
      ...(inp.model === 'SEIR' ? { sigma: fit.params.sigma ?? inp.params.sigma } : {}),
      ...(inp.model === 'SIRS' ? { omega: fit.params.omega ?? inp.params.omega } : {}),
    },
    method: 'rk4',
    step,
    days: base.days,
    ...(base.capacity ? { capacity: base.capacity } : {}),
    ...(base.interventions?.length ? { interventions: base.interventions } : {}),
  };
}

interface Props {
  fit: FitResult;
  observed: Observed;
  outbreakId: string;
  beds: number;
  startDate: string | null;
}

/** Forecast bands from the fit's uncertainty (worker, progress, Cancel), the peak and bed figures with ranges, save and publish. */
export function ForecastPanel({ fit, observed, outbreakId, beds: outbreakBeds, startDate }: Props) {
  const { me } = useMe();
  const job = useWorkerJob<{ result: ForecastResult; base: ForecastBase }>();
  const [days, setDays] = useState(Math.max(90, observed.dataUntil + 60));
  const [runs, setRuns] = useState(1000);
  const [step, setStep] = useState(fit.input.step);
  const [beds, setBeds] = useState(outbreakBeds);
  const [admission, setAdmission] = useState(0.02);
  const [stay, setStay] = useState(5);
  const [withCut, setWithCut] = useState(false);
  const [cut, setCut] = useState({ startDay: observed.dataUntil + 1, contactReduction: 0.3 });
  const [name, setName] = useState('');
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const [saving, setSaving] = useState(false);

  const base = useMemo<ForecastBase>(() => ({
    days: Math.round(days),
    method: 'rk4',
    step,
    capacity: { admissionFraction: admission, lengthOfStay: stay, beds },
    ...(withCut ? { interventions: [{ startDay: cut.startDay, contactReduction: cut.contactReduction }] } : {}),
  }), [days, step, admission, stay, beds, withCut, cut]);
  const valid = step > 0 && step <= 1 && days > observed.dataUntil && days <= 3650 && runs >= 10 && runs <= 20000 && beds >= 0 && admission >= 0 && admission <= 1 && stay > 0
    && (!withCut || (cut.contactReduction >= 0 && cut.contactReduction <= 1 && cut.startDay >= 0));

  const run = () => {
    setMessage(null);
    const b = base;
    job.start(async (c, onProgress) => ({ result: await c.forecastFromFit(fit, b, Math.round(runs), 7, onProgress), base: b }));
  };

  const res = job.result;
  const save = async (official: boolean) => {
    if (!res) return;
    setSaving(true);
    setMessage(null);
    try {
      const notes: ScenarioNotes = {
        source: 'fit',
        fit: {
          dataUntil: observed.dataUntil,
          R0: fit.R0,
          R0Range: fit.interval.R0 ?? null,
          infectiousPeriod: fit.infectiousPeriod,
          infectiousPeriodRange: fit.interval.infectiousPeriod ?? null,
          flags: flagWords(fit),
        },
        forecast: forecastNotes(res.result),
      };
      const label = name.trim() || `Forecast from ${dayLabel(startDate, observed.dataUntil)}${res.base.interventions?.length ? ', with intervention' : ''}`;
      const rec = await saveScenario(outbreakId, { name: label, input: scenarioFromFit(fit, res.base, res.result.step), notes });
      if (official) await publishScenario(rec.id, true);
      setMessage({ tone: 'success', text: official ? `Published “${rec.name}” as the official forecast.` : `Saved “${rec.name}”.` });
    } catch (e) {
      setMessage({ tone: 'error', text: e instanceof Error ? e.message : 'Not saved.' });
    } finally {
      setSaving(false);
    }
  };

  const r = res?.result;
  const limit = res?.base.capacity ? { value: res.base.capacity.beds, label: `${people(res.base.capacity.beds)} beds` } : undefined;
  const obs = useMemo(() => ({ day: observed.incidence.map((_, d) => d), value: observed.incidence }), [observed]);
  const notes = r ? forecastNotes(r) : null;
  return (
    <div className="flex flex-col gap-3" data-testid="forecast">
      <p className="text-sm text-ink/80">
        Runs the fitted model forward once for each of many parameter sets drawn from the fit's uncertainty. The bands show how
        far apart the runs end up; they do not include changes in behaviour, reporting or the virus.
      </p>
      <div className="grid gap-3 sm:grid-cols-3">
        <NumberField label="Horizon" unit="days" value={days} digits={6} testId="fc-days" onChange={(v) => v !== undefined && setDays(v)} />
        <NumberField label="Runs" value={runs} digits={6} testId="fc-runs" onChange={(v) => v !== undefined && setRuns(v)} />
        <NumberField label="RK4 step" unit="day" value={step} testId="fc-step" onChange={(v) => v !== undefined && setStep(v)}
          hint="Lowered for every run if a draw needs a smaller safe step." />
        <NumberField label="Beds available" unit="beds" value={beds} digits={8} testId="fc-beds" onChange={(v) => v !== undefined && setBeds(v)} />
        <NumberField label="Admitted" unit="% of cases" scale={100} value={admission} onChange={(v) => v !== undefined && setAdmission(v)} />
        <NumberField label="Length of stay" unit="days" value={stay} onChange={(v) => v !== undefined && setStay(v)} />
      </div>
      <div className="flex flex-wrap items-end gap-3">
        <label className="flex min-h-touch items-center gap-3 font-bold">
          <input type="checkbox" className="h-6 w-6 accent-[#1F6F78]" checked={withCut} data-testid="fc-with-cut" onChange={(e) => setWithCut(e.target.checked)} />
          With an intervention
        </label>
        {withCut && (
          <>
            <div className="w-40"><NumberField label="From day" value={cut.startDay} digits={6} testId="fc-cut-start" onChange={(v) => v !== undefined && setCut((c) => ({ ...c, startDay: v }))} /></div>
            <div className="w-44"><NumberField label="Contacts cut" unit="%" scale={100} value={cut.contactReduction} testId="fc-cut" onChange={(v) => v !== undefined && setCut((c) => ({ ...c, contactReduction: v }))} /></div>
          </>
        )}
      </div>
      {job.status === 'running' ? (
        <ProgressBar progress={job.progress} label="Forecast progress" onCancel={job.cancel} testId="forecast-progress" />
      ) : (
        <div className="flex flex-wrap items-center gap-3">
          <Button onClick={run} disabled={!valid} data-testid="forecast-run">Forecast with {Math.round(runs).toLocaleString('en')} runs</Button>
          {job.status === 'cancelled' && <span className="font-bold" data-testid="forecast-cancelled">Cancelled.</span>}
        </div>
      )}
      {job.error && <Notice tone="error">The forecast failed: {job.error.message}</Notice>}
      {r && notes && res && (
        <div className="flex flex-col gap-4" data-testid="forecast-result">
          <div className="grid gap-x-6 md:grid-cols-2">
            <Figure testId="fc-peak-day" label="Peak (median, 90% range)" value={`${dayLabel(startDate, notes.peakDay)}`}
              reading={`between ${dayLabel(startDate, notes.peakDayRange[0])} and ${dayLabel(startDate, notes.peakDayRange[1])} in 90% of runs`} />
            <Figure testId="fc-peak-size" label="People infectious at the peak" value={`${people(notes.peakInfectious)} (${range(notes.peakInfectiousRange, people)})`}
              reading={`the most people ill at once; 90% of runs fall in the range shown`} />
            {notes.bedPeak !== null && (
              <Figure testId="fc-bed-peak" label="Most beds needed (median, 90% band)" tone={notes.bedPeak > beds ? 'warning' : undefined}
                value={`${people(notes.bedPeak)} (${range(notes.bedPeakRange, people)})`}
                reading={notes.bedPeak > beds ? `more than the ${people(beds)} beds available` : `within the ${people(beds)} beds on the median curve`} />
            )}
            {notes.bedsExceededShare !== null && (
              <Figure testId="fc-beds-exceeded" label="Beds first exceeded" tone={notes.bedsExceededShare > 0.5 ? 'warning' : undefined}
                value={notes.bedsExceededDay !== null ? dayLabel(startDate, notes.bedsExceededDay) : notes.bedsExceededShare === 0 ? 'never in the horizon' : 'not in most runs'}
                reading={notes.bedsExceededShare === 0
                  ? 'in no run does demand exceed the beds'
                  : `in ${Math.round(notes.bedsExceededShare * 100)}% of runs${notes.bedsExceededRange?.[0] != null ? `, from ${dayLabel(startDate, notes.bedsExceededRange[0])} at the earliest (5%)` : ''}${notes.bedsExceededRange?.[1] != null ? ` to ${dayLabel(startDate, notes.bedsExceededRange[1])} (95%)` : ''}`} />
            )}
          </div>
          <h3 className="font-bold">New cases per day</h3>
          <BandChart t={r.t} bands={r.bands.incidence} unit="new cases per day" observed={obs} cutoff={r.dataUntil} startDate={startDate}
            testId="forecast-incidence-chart" label={`Forecast of new cases per day: median and bands of ${r.runs} runs, with the tallies`} />
          <h3 className="font-bold">People infectious (prevalence)</h3>
          <BandChart t={r.t} bands={r.bands.I} unit="people infectious" cutoff={r.dataUntil} startDate={startDate} height={240}
            testId="forecast-prevalence-chart" label={`Forecast of people infectious: median and bands of ${r.runs} runs`} />
          {r.bands.bedDemand && (
            <>
              <h3 className="font-bold">Bed demand</h3>
              <BandChart t={r.t} bands={r.bands.bedDemand} unit="beds" limit={limit} cutoff={r.dataUntil} startDate={startDate} height={240}
                testId="forecast-beds-chart" label={`Forecast bed demand against the beds available: median and bands of ${r.runs} runs`} />
            </>
          )}
          <div className="flex flex-wrap items-end gap-2 border-t border-line pt-3">
            <div className="min-w-56 flex-1">
              <TextField label="Scenario name" value={name} onChange={(e) => setName(e.target.value)} data-testid="fc-name" maxLength={120}
                placeholder={`Forecast from ${dayLabel(startDate, observed.dataUntil)}`} />
            </div>
            <Button variant="secondary" onClick={() => save(false)} disabled={saving} data-testid="fc-save">Save as scenario</Button>
            {me?.role === 'coordinator' && (
              <Button onClick={() => save(true)} disabled={saving} data-testid="fc-publish">Publish as official forecast</Button>
            )}
          </div>
          {message && <Notice tone={message.tone}>{message.text}</Notice>}
        </div>
      )}
    </div>
  );
}
