'use client';
import { forwardRef } from 'react';
import { FieldShell } from '@/components/ui/field';

export interface CountStepperProps {
  label: string;
  /** The field as typed (a string, so a half-typed or empty value is kept as the person wrote it). */
  value: string;
  onChange: (value: string) => void;
  error?: string;
  hint?: string;
  name: string;
}

const STEP = 'min-h-14 min-w-14 rounded-lg border-2 border-ink/30 bg-panel text-2xl font-bold text-ink hover:border-accent active:bg-accent/10';

/** A big whole-number field with − and + buttons (56 px), for thumbs on a tablet. */
export const CountStepper = forwardRef<HTMLInputElement, CountStepperProps>(function CountStepper({ label, value, onChange, error, hint, name }, ref) {
  const n = Number(value);
  const step = (d: number) => {
    // A blank, unreadable or negative entry steps from 0, the only sensible floor for a count.
    const base = value.trim() === '' || !Number.isFinite(n) ? 0 : Math.max(0, Math.trunc(n));
    onChange(String(Math.max(0, base + d)));
  };
  return (
    <FieldShell label={label} hint={hint} error={error}>
      {({ id, describedBy, invalid }) => (
        <div className="flex items-stretch gap-2">
          <button type="button" className={STEP} aria-label={`${label}: one less`} onClick={() => step(-1)} tabIndex={-1}>−</button>
          <input
            ref={ref} id={id} name={name} aria-describedby={describedBy} aria-invalid={invalid}
            inputMode="numeric" autoComplete="off" value={value}
            onChange={(e) => onChange(e.target.value)}
            className="num min-h-14 w-full min-w-0 rounded-lg border-2 border-ink/30 bg-white px-3 text-center text-2xl font-bold text-ink focus:border-accent aria-[invalid=true]:border-warning"
          />
          <button type="button" className={STEP} aria-label={`${label}: one more`} onClick={() => step(1)} tabIndex={-1}>+</button>
        </div>
      )}
    </FieldShell>
  );
});
