'use client';
import { useState, type ReactNode } from 'react';
import { FieldShell } from '@/components/ui/field';

export interface NumberFieldProps {
  label: string;
  /** The stored value (in stored units); undefined shows an empty box. */
  value: number | undefined;
  /** Called with each parseable entry, in stored units; with undefined when the box is emptied (if `optional`). */
  onChange: (v: number | undefined) => void;
  /** Unit shown after the box ("per day", "days", "%"). */
  unit?: string;
  hint?: ReactNode;
  error?: string;
  /** Shown = stored × scale (100 for a percentage of a fraction). */
  scale?: number;
  /** Significant digits of the shown value when it was computed, not typed. */
  digits?: number;
  optional?: boolean;
  testId?: string;
  /** Accessible name when the visible label is shared (table cells). */
  ariaLabel?: string;
  compact?: boolean;
}

const show = (v: number | undefined, scale: number, digits: number) =>
  v === undefined || !Number.isFinite(v) ? '' : String(Number((v * scale).toPrecision(digits)));

/**
 * A numeric box that keeps what is being typed ("2.", "0.0") while it has focus and shows the stored
 * value, rounded, otherwise, so two boxes bound to one quantity (R0 and β) can follow each other.
 */
export function NumberField({ label, value, onChange, unit, hint, error, scale = 1, digits = 4, optional, testId, ariaLabel, compact }: NumberFieldProps) {
  const [text, setText] = useState<string | null>(null);
  const input = (id?: string, describedBy?: string, invalid?: boolean) => (
    <div className="flex items-center gap-2">
      <input
        id={id}
        data-testid={testId}
        aria-label={ariaLabel}
        aria-describedby={describedBy}
        aria-invalid={invalid}
        inputMode="decimal"
        className={`min-h-touch w-full min-w-0 rounded-lg border-2 border-ink/30 bg-white px-3 text-ink focus:border-accent aria-[invalid=true]:border-warning ${compact ? 'max-w-28' : ''}`}
        value={text ?? show(value, scale, digits)}
        onFocus={() => setText(show(value, scale, digits))}
        onBlur={() => setText(null)}
        onChange={(e) => {
          const raw = e.target.value;
          setText(raw);
          const trimmed = raw.trim().replace(',', '.');
          if (trimmed === '') {
            if (optional) onChange(undefined);
            return;
          }
          const n = Number(trimmed);
          if (Number.isFinite(n)) onChange(n / scale);
        }}
      />
      {unit && <span className="shrink-0 text-sm text-ink/70">{unit}</span>}
    </div>
  );
  if (compact) return input(undefined, undefined, Boolean(error));
  return (
    <FieldShell label={label} hint={hint} error={error}>
      {({ id, describedBy, invalid }) => input(id, describedBy, invalid)}
    </FieldShell>
  );
}
