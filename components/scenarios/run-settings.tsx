'use client';
import type { ScenarioInput } from '@/lib/model';
import { SelectField } from '@/components/ui/field';
import { NumberField } from './number-field';

type Update = (fn: (d: ScenarioInput) => ScenarioInput) => void;

const METHODS = [
  { value: 'rk4', label: 'RK4 (fourth order, default)' },
  { value: 'euler', label: 'Forward Euler (first order)' },
  { value: 'dopri5', label: 'Adaptive Dormand–Prince' },
];

/** Integrator, step and horizon. */
export function RunSettings({ draft, update, errors }: { draft: ScenarioInput; update: Update; errors: Record<string, string> }) {
  return (
    <fieldset className="flex flex-col gap-3">
      <legend className="mb-1 font-bold">Integrator and horizon</legend>
      <SelectField label="Integrator" className="w-full" options={METHODS} value={draft.method} data-testid="method"
          onChange={(e) => update((d) => ({ ...d, method: e.target.value as ScenarioInput['method'] }))}
          hint={draft.method === 'euler' ? 'Simple and easy to audit; needs small steps.' : draft.method === 'rk4' ? 'Accurate at practical steps.' : 'Chooses its own steps to a tolerance.'} />
      <div className="grid gap-3 sm:grid-cols-2">
        <NumberField label={draft.method === 'dopri5' ? 'First step' : 'Step size'} unit="day" value={draft.step} testId="step" error={errors.step}
          onChange={(v) => v !== undefined && update((d) => ({ ...d, step: v }))} hint="Time advanced per integration step." />
        <NumberField label="Horizon" unit="days" value={draft.days} testId="days" error={errors.days} digits={6}
          onChange={(v) => v !== undefined && update((d) => ({ ...d, days: Math.round(v) }))} hint="How far ahead to run." />
      </div>
    </fieldset>
  );
}

/** Admission share, length of stay and beds, for bed demand; can be switched off. */
export function CapacityFields({ draft, update, errors, defaultBeds }: { draft: ScenarioInput; update: Update; errors: Record<string, string>; defaultBeds: number }) {
  const cap = draft.capacity;
  const set = (p: Partial<NonNullable<ScenarioInput['capacity']>>) =>
    update((d) => ({ ...d, capacity: { admissionFraction: 0.02, lengthOfStay: 5, beds: defaultBeds, ...d.capacity, ...p } }));
  return (
    <fieldset className="flex flex-col gap-3">
      <legend className="mb-1 font-bold">Beds</legend>
      <label className="flex min-h-touch items-center gap-3 font-bold">
        <input type="checkbox" className="h-6 w-6 accent-[#1F6F78]" checked={Boolean(cap)} data-testid="capacity-toggle"
          onChange={(e) => update((d) => {
            const next = { ...d };
            if (e.target.checked) next.capacity = { admissionFraction: 0.02, lengthOfStay: 5, beds: defaultBeds };
            else delete next.capacity;
            return next;
          })} />
        Plan bed demand
      </label>
      {cap && (
        <div className="grid gap-3 sm:grid-cols-3">
          <NumberField label="Admitted" unit="% of cases" scale={100} value={cap.admissionFraction} testId="admission" error={errors['capacity.admissionFraction']}
            onChange={(v) => v !== undefined && set({ admissionFraction: v })} hint="Share of new cases that need a bed." />
          <NumberField label="Length of stay" unit="days" value={cap.lengthOfStay} testId="stay" error={errors['capacity.lengthOfStay']}
            onChange={(v) => v !== undefined && set({ lengthOfStay: v })} hint="Average days in a bed." />
          <NumberField label="Beds available" unit="beds" value={cap.beds} testId="beds" error={errors['capacity.beds']} digits={8}
            onChange={(v) => v !== undefined && set({ beds: v })} hint="For these patients." />
        </div>
      )}
    </fieldset>
  );
}
