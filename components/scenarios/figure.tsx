import type { ReactNode } from 'react';

/** One headline figure: label, value (tabular figures) and its plain reading on one line. */
export function Figure({ label, value, reading, testId, tone }: { label: string; value: ReactNode; reading: ReactNode; testId?: string; tone?: 'warning' }) {
  return (
    <div data-testid={testId} className="flex flex-col border-b border-line py-2 last:border-b-0">
      <span className="text-sm font-bold text-ink/75">{label}</span>
      <span data-testid={testId ? `${testId}-value` : undefined} className={`num font-mono text-xl font-bold ${tone === 'warning' ? 'text-warning' : ''}`}>{value}</span>
      <p className="text-sm text-ink/80">{reading}</p>
    </div>
  );
}
