'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';
import { UplotChart } from './uplot-chart';
import { dayAxis, daySeries, line, valueAxis } from './chart-theme';

/** Infectious people from RK4 (solid) and forward Euler (dashed) at the same step, on the same days. */
export function StepOverlayChart({ t, rk4, euler, step, startDate, height = 240 }: {
  t: Float64Array; rk4: Float64Array; euler: Float64Array; step: number; startDate?: string | null; height?: number;
}) {
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [dayAxis(startDate), valueAxis('people infectious')],
      series: [
        daySeries(startDate),
        line(`RK4, step ${step} day`, { stroke: palette.infectious, width: 3 }),
        line(`forward Euler, step ${step} day`, { stroke: palette.ink, width: 2, dash: [8, 5] }),
      ],
    }),
    [startDate, step],
  );
  const data = useMemo(() => [t, rk4, euler] as uPlot.AlignedData, [t, rk4, euler]);
  return <UplotChart options={options} data={data} height={height} testId="step-overlay-chart" label={`Infectious people by RK4 and by forward Euler at a step of ${step} day`} />;
}
