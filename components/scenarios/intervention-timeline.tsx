'use client';
import type { ScenarioInput } from '@/lib/model';
import { palette } from '@/tailwind.config';
import { Button } from '@/components/ui/button';
import { NumberField } from './number-field';

type Update = (fn: (d: ScenarioInput) => ScenarioInput) => void;
type Intervention = NonNullable<ScenarioInput['interventions']>[number];

/** A strip over the horizon with one bar per intervention, darker for a stronger cut. */
function Strip({ list, days }: { list: Intervention[]; days: number }) {
  if (!list.length) return null;
  const rowH = 14;
  return (
    <svg role="img" aria-label="Interventions over the horizon" viewBox={`0 0 100 ${list.length * (rowH + 4)}`} preserveAspectRatio="none"
      className="h-auto w-full" style={{ height: `${list.length * 18}px` }}>
      {list.map((iv, i) => {
        const x0 = Math.min(100, (iv.startDay / days) * 100);
        const x1 = Math.min(100, ((iv.endDay ?? days) / days) * 100);
        return (
          <rect key={i} x={x0} y={i * (rowH + 4)} width={Math.max(0.5, x1 - x0)} height={rowH} rx={1}
            fill={palette.accent} fillOpacity={0.25 + 0.75 * iv.contactReduction} />
        );
      })}
    </svg>
  );
}

/** Contact reductions from a start day to an end day; overlapping ones multiply. Add, edit and remove rows. */
export function InterventionTimeline({ draft, update, errors }: { draft: ScenarioInput; update: Update; errors: Record<string, string> }) {
  const list = draft.interventions ?? [];
  const setRow = (i: number, patch: Partial<Intervention>) =>
    update((d) => ({ ...d, interventions: (d.interventions ?? []).map((iv, k) => (k === i ? { ...iv, ...patch } : iv)) }));
  const setEnd = (i: number, v: number | undefined) =>
    update((d) => ({
      ...d,
      interventions: (d.interventions ?? []).map((iv, k) => {
        if (k !== i) return iv;
        const { endDay: _drop, ...rest } = iv;
        return v === undefined ? rest : { ...rest, endDay: v };
      }),
    }));
  return (
    <fieldset className="flex flex-col gap-2" data-testid="interventions">
      <legend className="mb-1 font-bold">Interventions</legend>
      <p className="text-sm text-ink/80">
        Cut contacts by a share from a start day to an end day (school closure, isolation, distancing). Leave the end empty to
        keep it to the horizon. Overlapping cuts multiply.
      </p>
      {list.length > 0 && (
        <table className="w-full text-left">
          <thead>
            <tr className="text-sm">
              <th className="pr-2">Start day</th>
              <th className="pr-2">End day</th>
              <th className="pr-2">Contacts cut</th>
              <th><span className="sr-only">Remove</span></th>
            </tr>
          </thead>
          <tbody>
            {list.map((iv, i) => {
              const err = errors[`interventions.${i}.startDay`] ?? errors[`interventions.${i}.endDay`] ?? errors[`interventions.${i}.contactReduction`];
              return (
                <tr key={i} data-testid={`intervention-${i}`} className="align-top">
                  <td className="py-1 pr-2">
                    <NumberField compact label="" ariaLabel={`Intervention ${i + 1} start day`} value={iv.startDay} testId={`iv-${i}-start`}
                      error={errors[`interventions.${i}.startDay`]} onChange={(v) => v !== undefined && setRow(i, { startDay: v })} />
                  </td>
                  <td className="py-1 pr-2">
                    <NumberField compact optional label="" ariaLabel={`Intervention ${i + 1} end day`} value={iv.endDay} testId={`iv-${i}-end`}
                      error={errors[`interventions.${i}.endDay`]} onChange={(v) => setEnd(i, v)} />
                  </td>
                  <td className="py-1 pr-2">
                    <NumberField compact label="" unit="%" scale={100} ariaLabel={`Intervention ${i + 1} contacts cut, percent`} value={iv.contactReduction}
                      testId={`iv-${i}-cut`} error={errors[`interventions.${i}.contactReduction`]} onChange={(v) => v !== undefined && setRow(i, { contactReduction: v })} />
                  </td>
                  <td className="py-1">
                    <Button variant="quiet" aria-label={`Remove intervention ${i + 1}`} data-testid={`iv-${i}-remove`}
                      onClick={() => update((d) => ({ ...d, interventions: (d.interventions ?? []).filter((_, k) => k !== i) }))}>
                      Remove
                    </Button>
                    {err && <p role="alert" className="text-sm font-bold text-warning">{err}</p>}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
      <Strip list={list} days={draft.days} />
      <div>
        <Button variant="secondary" data-testid="add-intervention"
          onClick={() => update((d) => {
            const prev = d.interventions ?? [];
            const start = prev.length ? Math.min(d.days - 1, (prev[prev.length - 1]!.endDay ?? prev[prev.length - 1]!.startDay + 14)) : Math.min(21, Math.floor(d.days / 4));
            return { ...d, interventions: [...prev, { startDay: start, endDay: Math.min(d.days, start + 28), contactReduction: 0.3 }] };
          })}>
          Add intervention
        </Button>
      </div>
    </fieldset>
  );
}
