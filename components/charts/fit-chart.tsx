'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';
import { UplotChart, type ChartOptions } from './uplot-chart';
import { dayAxis, daySeries, line, valueAxis } from './chart-theme';

export interface FitChartProps {
  /** The fitted curve on every day 0..last observed day. */
  trajectory: { t: Float64Array; value: Float64Array };
  /** Observed days and counts. */
  day: number[];
  observed: number[];
  residual: number[];
  residualKind: 'pearson' | 'raw';
  startDate?: string | null;
}

const bars = (U: typeof uPlot) => U.paths.bars!({ size: [0.7, 24] });
/** Half a day of room at each end, so the first and last days' bars are drawn whole. */
const dayScale = { time: false, range: (_u: uPlot, min: number, max: number): [number, number] => [min - 0.5, max + 0.5] };

/** The observed tallies (bars) drawn over the fitted curve, and the residuals below on the same days. */
export function FitChart({ trajectory, day, observed, residual, residualKind, startDate }: FitChartProps) {
  const mainOptions = useMemo(
    () => (U: typeof uPlot): ChartOptions => ({
      scales: { x: dayScale },
      axes: [dayAxis(startDate), valueAxis('new cases per day')],
      series: [
        daySeries(startDate),
        line('observed tallies', { stroke: palette.ink, width: 1 }, { fill: 'rgba(29, 36, 51, 0.28)', paths: bars(U) }),
        line('fitted model', { stroke: palette.infectious, width: 3 }),
      ],
    }),
    [startDate],
  );
  const resOptions = useMemo(
    () => (U: typeof uPlot): ChartOptions => ({
      scales: { x: dayScale },
      axes: [dayAxis(startDate), valueAxis(residualKind === 'pearson' ? 'residual (sd)' : 'residual (cases)')],
      series: [
        daySeries(startDate),
        line('residual', { stroke: palette.removed, width: 1 }, { fill: 'rgba(74, 90, 156, 0.45)', paths: bars(U) }),
      ],
      legend: { show: false },
    }),
    [startDate, residualKind],
  );
  const mainData = useMemo(() => {
    const obs: (number | null)[] = Array.from(trajectory.t, () => null);
    day.forEach((d, i) => {
      if (d >= 0 && d < obs.length) obs[d] = observed[i] ?? null;
    });
    return [trajectory.t, obs, trajectory.value] as uPlot.AlignedData;
  }, [trajectory, day, observed]);
  const resData = useMemo(() => {
    const res: (number | null)[] = Array.from(trajectory.t, () => null);
    day.forEach((d, i) => {
      if (d >= 0 && d < res.length) res[d] = residual[i] ?? null;
    });
    return [trajectory.t, res] as uPlot.AlignedData;
  }, [trajectory, day, residual]);
  return (
    <div className="flex flex-col gap-1">
      <UplotChart options={mainOptions} data={mainData} height={280} testId="fit-chart" label="Observed daily tallies as bars with the fitted model as a line" />
      <UplotChart options={resOptions} data={resData} height={180} testId="residual-chart" label="Residuals of the fit on each observed day" />
    </div>
  );
}
