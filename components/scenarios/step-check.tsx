'use client';
import { StepOverlayChart } from '@/components/charts/step-overlay-chart';
import { Notice } from '@/components/ui/notice';
import { dayLabel } from '@/components/charts/chart-theme';
import type { StepCheck } from './use-live-run';
import { people, pct } from './readings';

/** Forward Euler against RK4 at the chosen step: both curves, and the largest gap between them. */
export function StepCheckPanel({ check, startDate }: { check: StepCheck; startDate?: string | null }) {
  return (
    <div className="flex flex-col gap-2" data-testid="step-check">
      {check.euler ? (
        <>
          <StepOverlayChart t={check.t} rk4={check.rk4} euler={check.euler} step={check.step} startDate={startDate} />
          <p data-testid="step-max-diff">
            Largest difference: <strong className="num font-mono">{people(check.maxDiff)} people</strong>
            {check.maxDiffDay !== null && <> on {dayLabel(startDate, check.maxDiffDay)}</>}
            {check.maxDiffShare !== null && <> ({pct(check.maxDiffShare, 2)} of the RK4 peak)</>}.{' '}
            <span className="text-ink/80">
              {check.maxDiffShare !== null && check.maxDiffShare < 0.01
                ? 'At this step the two methods agree closely.'
                : 'This gap is the step error of forward Euler; a smaller step narrows it.'}
            </span>
          </p>
        </>
      ) : (
        <Notice tone="caution">
          <p className="font-bold">Forward Euler cannot run at a step of {check.step} day for this scenario.</p>
          {check.eulerError && <p>{check.eulerError.message}</p>}
        </Notice>
      )}
    </div>
  );
}
