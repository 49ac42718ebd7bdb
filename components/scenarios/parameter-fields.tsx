'use client';
import type { ScenarioInput } from '@/lib/model';
import { NumberField } from './number-field';

type Errors = Record<string, string>;
type Update = (fn: (d: ScenarioInput) => ScenarioInput) => void;

const MODELS: { value: ScenarioInput['model']; title: string; text: string }[] = [
  { value: 'SIR', title: 'SIR', text: 'Susceptible → infectious → removed. Immunity lasts.' },
  { value: 'SEIR', title: 'SEIR', text: 'Adds a latent (exposed) stage before people become infectious.' },
  { value: 'SIRS', title: 'SIRS', text: 'Immunity wanes: removed people become susceptible again.' },
];

/** Choice of model, and vaccination on or off. */
export function ModelChoice({ draft, update }: { draft: ScenarioInput; update: Update }) {
  const vaccinating = draft.vaccination !== undefined;
  return (
    <fieldset className="flex flex-col gap-2">
      <legend className="mb-1 font-bold">Model</legend>
      <div className="grid grid-cols-3 gap-2" role="radiogroup" aria-label="Model">
        {MODELS.map((m) => {
          const on = draft.model === m.value;
          return (
            <button
              key={m.value}
              type="button"
              role="radio"
              aria-checked={on}
              data-testid={`model-${m.value}`}
              title={m.text}
              onClick={() =>
                update((d) => {
                  const next: ScenarioInput = { ...d, model: m.value, params: { ...d.params }, initial: { ...d.initial } };
                  if (m.value === 'SEIR') next.params.sigma ??= 0.5;
                  else {
                    delete next.params.sigma;
                    delete next.initial.E;
                  }
                  if (m.value === 'SIRS') next.params.omega ??= 1 / 180;
                  else delete next.params.omega;
                  return next;
                })
              }
              className={`min-h-touch rounded-lg border-2 px-2 font-bold ${on ? 'border-accent bg-accent text-white' : 'border-ink/30 bg-white'}`}
            >
              {m.title}
            </button>
          );
        })}
      </div>
      <p className="text-sm text-ink/80">{MODELS.find((m) => m.value === draft.model)?.text}</p>
      <label className="flex min-h-touch items-center gap-3 font-bold">
        <input
          type="checkbox"
          className="h-6 w-6 accent-[#1F6F78]"
          checked={vaccinating}
          data-testid="vaccination-toggle"
          onChange={(e) =>
            update((d) => {
              const next = { ...d };
              if (e.target.checked) next.vaccination = { atStart: 0, dailyRate: 0.01, startDay: 14 };
              else delete next.vaccination;
              return next;
            })
          }
        />
        With vaccination
      </label>
    </fieldset>
  );
}

/**
 * Rates with units and plain help. R0 and the infectious period can be typed instead of β and γ:
 * changing the infectious period keeps R0 (β follows), changing β or γ directly moves R0.
 */
export function ParameterFields({ draft, update, errors }: { draft: ScenarioInput; update: Update; errors: Errors }) {
  const { beta, gamma, sigma, omega } = draft.params;
  const R0 = gamma > 0 ? beta / gamma : NaN;
  const setParams = (p: Partial<ScenarioInput['params']>) => update((d) => ({ ...d, params: { ...d.params, ...p } }));
  return (
    <fieldset className="flex flex-col gap-3">
      <legend className="mb-1 font-bold">People and parameters</legend>
      <div className="grid gap-3 sm:grid-cols-2">
        <NumberField label="Population" unit="people" value={draft.population} testId="population" error={errors.population}
          onChange={(v) => v !== undefined && update((d) => ({ ...d, population: v }))} hint="Everyone who could catch it." digits={10} />
        <NumberField label="Infectious at day 0" unit="people" value={draft.initial.I} testId="initial-I" error={errors['initial.I'] ?? errors.initial}
          onChange={(v) => v !== undefined && update((d) => ({ ...d, initial: { ...d.initial, I: v } }))} hint="Cases able to pass it on at the start." digits={8} />
        <NumberField label="R0 (basic reproduction number)" value={R0} testId="R0"
          onChange={(v) => v !== undefined && v >= 0 && setParams({ beta: v * gamma })}
          hint="How many people one case infects when nobody is immune." />
        <NumberField label="Infectious period" unit="days" value={gamma > 0 ? 1 / gamma : undefined} testId="infectious-period"
          onChange={(v) => v !== undefined && v > 0 && setParams({ gamma: 1 / v, beta: (Number.isFinite(R0) ? R0 : 2) / v })}
          hint="How long a case can pass it on (R0 is kept)." />
        <NumberField label="Transmission rate β" unit="per day" value={beta} testId="beta" error={errors['params.beta']}
          onChange={(v) => v !== undefined && setParams({ beta: v })} hint="Infections one case causes per day among susceptibles." />
        <NumberField label="Recovery rate γ" unit="per day" value={gamma} testId="gamma" error={errors['params.gamma']}
          onChange={(v) => v !== undefined && setParams({ gamma: v })} hint="1 / infectious period." />
        {draft.model === 'SEIR' && (
          <>
            <NumberField label="Latent period" unit="days" value={sigma && sigma > 0 ? 1 / sigma : undefined} testId="latent-period"
              onChange={(v) => v !== undefined && v > 0 && setParams({ sigma: 1 / v })} hint="Infected but not yet infectious." />
            <NumberField label="Exposed at day 0" unit="people" value={draft.initial.E ?? 0} testId="initial-E" error={errors['initial.E']}
              onChange={(v) => update((d) => ({ ...d, initial: { ...d.initial, E: v ?? 0 } }))} hint="Infected, not yet infectious." />
            <NumberField label="Onset rate σ" unit="per day" value={sigma} error={errors['params.sigma']}
              onChange={(v) => v !== undefined && setParams({ sigma: v })} hint="1 / latent period." />
          </>
        )}
        {draft.model === 'SIRS' && (
          <>
            <NumberField label="Immunity lasts" unit="days" value={omega && omega > 0 ? 1 / omega : undefined} testId="immunity"
              onChange={(v) => v !== undefined && v > 0 && setParams({ omega: 1 / v })} hint="On average, before a recovered person can be infected again." />
            <NumberField label="Waning rate ω" unit="per day" value={omega} error={errors['params.omega']}
              onChange={(v) => v !== undefined && setParams({ omega: v })} hint="1 / how long immunity lasts." />
          </>
        )}
      </div>
      {draft.vaccination && (
        <div className="grid gap-3 rounded-lg border border-vaccinated/40 bg-vaccinated/5 p-3 sm:grid-cols-3">
          <NumberField label="Vaccinated at day 0" unit="%" scale={100} value={draft.vaccination.atStart ?? 0} testId="vacc-at-start"
            error={errors['vaccination.atStart']} hint="Share of susceptibles immune from the start."
            onChange={(v) => update((d) => ({ ...d, vaccination: { ...d.vaccination, atStart: v ?? 0 } }))} />
          <NumberField label="Campaign pace" unit="% per day" scale={100} value={draft.vaccination.dailyRate ?? 0} testId="vacc-rate"
            error={errors['vaccination.dailyRate']} hint="Share of remaining susceptibles vaccinated each day."
            onChange={(v) => update((d) => ({ ...d, vaccination: { ...d.vaccination, dailyRate: v ?? 0 } }))} />
          <NumberField label="Campaign starts" unit="day" value={draft.vaccination.startDay ?? 0} testId="vacc-start"
            error={errors['vaccination.startDay']} hint="Day the daily campaign begins."
            onChange={(v) => update((d) => ({ ...d, vaccination: { ...d.vaccination, startDay: v ?? 0 } }))} />
        </div>
      )}
    </fieldset>
  );
}
