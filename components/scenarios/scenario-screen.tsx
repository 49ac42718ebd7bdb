'use client';
import { useEffect, useMemo } from 'react';
import { useSearchParams } from 'next/navigation';
import { ModelError, scenarioInputSchema, type ScenarioInput } from '@/lib/model';
import { useOutbreak, useOutbreaks } from '@/lib/data/hooks';
import { useOutbreakId } from '@/lib/data/use-outbreak-id';
import { useScenarios } from '@/lib/data/scenarios';
import { useScenarioEditor } from '@/lib/stores/scenario-editor';
import { Cautions } from '@/components/cautions';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/notice';
import { CompartmentChart } from '@/components/charts/compartment-chart';
import { MultiLineChart } from '@/components/charts/multi-line-chart';
import { dayLabel } from '@/components/charts/chart-theme';
import { EnsemblePanel } from './ensemble-panel';
import { InterventionTimeline } from './intervention-timeline';
import { ModelChoice, ParameterFields } from './parameter-fields';
import { CapacityFields, RunSettings } from './run-settings';
import { SavedScenarios } from './saved-scenarios';
import { ScenarioFigures } from './scenario-figures';
import { StepCheckPanel } from './step-check';
import { useLiveRun } from './use-live-run';
import { niceStep, people } from './readings';

/** Field path → first message, from the engine's own schema (the same one the worker and the API use). */
function fieldErrors(draft: ScenarioInput): { errors: Record<string, string>; input: ScenarioInput | null } {
  const r = scenarioInputSchema.safeParse(draft);
  if (r.success) return { errors: {}, input: r.data };
  const errors: Record<string, string> = {};
  for (const i of r.error.issues) {
    const k = i.path.map(String).join('.');
    if (!(k in errors)) errors[k] = i.message;
  }
  return { errors, input: null };
}

/** When Rt first drops below 1 (immunity and interventions together), in plain words. */
function rtReading(t: Float64Array, Rt: Float64Array, startDate: string | null): string {
  if ((Rt[0] ?? 0) <= 1) return 'Rt starts below 1: each case infects fewer than one other and cases fall from the start.';
  for (let k = 1; k < Rt.length; k++) {
    if (Rt[k]! < 1) return `Rt falls below 1 on ${dayLabel(startDate, t[k]!)}: from then on each case infects fewer than one other, so cases fall.`;
  }
  return 'Rt stays above 1 over the whole horizon: cases are still growing at its end.';
}

/** The scenario screen: the model and its settings on the left, the live run and its figures on the right. */
export function ScenarioScreen() {
  const { outbreaks } = useOutbreaks();
  const outbreakId = useOutbreakId() ?? outbreaks[0]?.id ?? null;
  const { outbreak, error: outbreakError } = useOutbreak(outbreakId);
  const startDate = outbreak?.startDate ?? null;
  const draft = useScenarioEditor((s) => s.draft);
  const update = useScenarioEditor((s) => s.update);
  const setDraft = useScenarioEditor((s) => s.setDraft);
  const setSaved = useScenarioEditor((s) => s.setSaved);
  const editorOutbreak = useScenarioEditor((s) => s.outbreakId);
  const reset = useScenarioEditor((s) => s.reset);
  const saved = useScenarioEditor((s) => s.saved);

  // A draft made for another outbreak starts again from this outbreak's population and beds.
  useEffect(() => {
    if (outbreak && editorOutbreak !== outbreak.id) reset({ id: outbreak.id, population: outbreak.population, beds: outbreak.beds });
  }, [outbreak, editorOutbreak, reset]);

  // ?id= opens a saved scenario in the editor.
  const wanted = useSearchParams().get('id');
  const { scenarios } = useScenarios(outbreakId);
  useEffect(() => {
    if (!wanted || saved?.id === wanted) return;
    const s = scenarios.find((x) => x.id === wanted);
    if (s) {
      setDraft(s.input as ScenarioInput);
      setSaved({ id: s.id, version: s.version, name: s.name });
    }
  }, [wanted, scenarios, saved?.id, setDraft, setSaved]);

  const { errors, input } = useMemo(() => fieldErrors(draft), [draft]);
  const live = useLiveRun(input);
  const unsafe = live.error instanceof ModelError && live.error.code === 'unsafe_step' ? live.error : null;
  const defaultBeds = outbreak?.beds ?? Math.max(1, Math.round(draft.population / 300));

  const bedChart = useMemo(() => {
    if (!live.run || !live.summary?.bedDemand || !input?.capacity) return null;
    return { t: live.run.t, series: [{ label: 'beds occupied', values: live.summary.bedDemand }], beds: input.capacity.beds };
  }, [live.run, live.summary, input]);

  // Until the outbreak is known (and a draft of another outbreak has been reset), show nothing to edit:
  // an edit made before the reset would be thrown away by it.
  if ((outbreakId && !outbreak && !outbreakError) || (outbreak && editorOutbreak !== outbreak.id)) {
    return <p>Loading the outbreak…</p>;
  }

  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h1>Scenarios</h1>
        <p className="text-ink/80">
          {outbreak ? <>{outbreak.name} · day 0 is {outbreak.startDate}</> : 'No outbreak chosen: dates are shown as day numbers.'}
          {saved && <> · editing “{saved.name}”</>}
        </p>
      </div>
      <div className="grid items-start gap-4 lg:grid-cols-[25rem_minmax(0,1fr)]">
        <form className="flex flex-col gap-4" onSubmit={(e) => e.preventDefault()} aria-label="Scenario settings">
          <Card><ModelChoice draft={draft} update={update} /></Card>
          <Card><ParameterFields draft={draft} update={update} errors={errors} /></Card>
          <Card><InterventionTimeline draft={draft} update={update} errors={errors} /></Card>
          <Card><RunSettings draft={draft} update={update} errors={errors} /></Card>
          <Card><CapacityFields draft={draft} update={update} errors={errors} defaultBeds={defaultBeds} /></Card>
        </form>

        <div className="flex min-w-0 flex-col gap-4">
          <Card title="The run" actions={<span aria-live="polite" className="text-sm text-ink/70" data-testid="run-status">{live.computing ? 'computing…' : live.run ? 'up to date' : ''}</span>}>
            {unsafe && (
              <Notice tone="error" className="mb-3">
                <div data-testid="unsafe-step">
                  <p className="font-bold">This step is too large for forward Euler.</p>
                  <p>{unsafe.message}</p>
                  {unsafe.largestSafeStep !== undefined && Number.isFinite(unsafe.largestSafeStep) && (
                    <Button className="mt-2" data-testid="use-safe-step" onClick={() => update((d) => ({ ...d, step: niceStep(unsafe.largestSafeStep!) }))}>
                      Use step {niceStep(unsafe.largestSafeStep)}
                    </Button>
                  )}
                </div>
              </Notice>
            )}
            {live.error && !unsafe && <Notice tone="error" className="mb-3">{live.error.message}</Notice>}
            {!input && <Notice tone="error" className="mb-3">Some settings are not valid: {Object.entries(errors).map(([k, v]) => `${k} ${v}`).join('; ')}.</Notice>}
            {live.run && !live.error && input ? (
              <>
                <CompartmentChart run={live.run} startDate={startDate} />
                {live.run.warnings.map((w) => <Notice key={w.code} className="mt-2">{w.message}</Notice>)}
              </>
            ) : (
              !live.error && input && <p className="py-16 text-center text-ink/70">Computing in the background…</p>
            )}
          </Card>

          {live.summary && input && !live.error && (
            <Card title="Figures">
              <ScenarioFigures summary={live.summary} input={input} startDate={startDate} />
            </Card>
          )}

          {live.run && live.summary && input && !live.error && (
            <Card title="Rt over time">
              <MultiLineChart t={live.run.t} series={[{ label: 'Rt', values: live.summary.Rt }]} unit="Rt" height={200} startDate={startDate}
                limit={{ value: 1, label: 'Rt = 1' }} testId="rt-run-chart" label="Effective reproduction number over time in this run" />
              <p className="mt-1 text-sm" data-testid="rt-reading">{rtReading(live.run.t, live.summary.Rt, startDate)}</p>
            </Card>
          )}

          {bedChart && (
            <Card title="Bed demand">
              <MultiLineChart t={bedChart.t} series={bedChart.series} unit="beds" limit={{ value: bedChart.beds, label: `${people(bedChart.beds)} beds` }}
                startDate={startDate} height={220} testId="beds-chart" label="Beds occupied over time against the beds available" />
            </Card>
          )}

          {live.check && (
            <Card title="Step check: forward Euler against RK4">
              <StepCheckPanel check={live.check} startDate={startDate} />
            </Card>
          )}

          <Card title="Ensemble over uncertain parameters">
            <EnsemblePanel input={input} startDate={startDate} />
          </Card>

          <Card title="Saved scenarios">
            <SavedScenarios outbreakId={outbreakId} draft={draft} valid={Boolean(input)} />
          </Card>

          <Cautions />
        </div>
      </div>
    </div>
  );
}
