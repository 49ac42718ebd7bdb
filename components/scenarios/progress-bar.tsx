'use client';
import { Button } from '@/components/ui/button';

/** A moving bar for a worker job, with its Cancel button. */
export function ProgressBar({ progress, label, onCancel, testId = 'progress' }: { progress: number; label: string; onCancel: () => void; testId?: string }) {
  const pct = Math.round(progress * 100);
  return (
    <div className="flex items-center gap-3" data-testid={`${testId}-box`}>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        data-testid={testId}
        className="h-5 flex-1 overflow-hidden rounded-full border-2 border-accent/50 bg-white"
      >
        <div className="h-full bg-accent transition-[width] duration-100" style={{ width: `${pct}%` }} />
      </div>
      <span className="num w-12 text-right font-mono font-bold">{pct}%</span>
      <Button variant="secondary" onClick={onCancel} data-testid={`${testId}-cancel`}>Cancel</Button>
    </div>
  );
}
