import type { ReactNode } from 'react';

/** A boxed message: `caution` for the standing cautions, `error` and `success` for outcomes. */
export function Notice({ tone = 'info', children, className = '' }: { tone?: 'info' | 'caution' | 'error' | 'success'; children: ReactNode; className?: string }) {
  const styles = {
    info: 'border-accent/40 bg-accent/5',
    caution: 'border-exposed bg-exposed/10',
    error: 'border-warning bg-warning/10',
    success: 'border-susceptible bg-susceptible/10',
  }[tone];
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={`rounded-lg border-l-4 p-3 ${styles} ${className}`}>
      {children}
    </div>
  );
}
