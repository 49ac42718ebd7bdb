'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';
import { UplotChart } from './uplot-chart';
import { dayAxis, daySeries, horizontalLine, line, valueAxis } from './chart-theme';

/** Rt over time: the posterior mean and its credible band, with the line Rt = 1. */
export function RtChart({ day, mean, lo, hi, startDate, height = 240 }: {
  day: number[]; mean: number[]; lo: number[]; hi: number[]; startDate?: string | null; height?: number;
}) {
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false }, y: { range: (_u, min, max) => [0, Math.max(2, Math.ceil(max * 1.1 * 2) / 2)] } },
      axes: [dayAxis(startDate), valueAxis('Rt')],
      series: [
        daySeries(startDate),
        line('upper end (95%)', { stroke: 'rgba(31, 111, 120, 0.5)', width: 1 }),
        line('Rt', { stroke: palette.accent, width: 3 }),
        line('lower end (95%)', { stroke: 'rgba(31, 111, 120, 0.5)', width: 1 }),
      ],
      bands: [{ series: [1, 3], fill: 'rgba(31, 111, 120, 0.18)' }],
      plugins: [horizontalLine(1, palette.warning, 'Rt = 1')],
    }),
    [startDate],
  );
  const data = useMemo(() => [day, hi, mean, lo] as uPlot.AlignedData, [day, hi, mean, lo]);
  return <UplotChart options={options} data={data} height={height} testId="rt-chart" label="Effective reproduction number Rt over time with its 95% credible band" />;
}
