'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';
import { UplotChart } from './uplot-chart';
import { SCENARIO_STYLES, dayAxis, daySeries, horizontalLine, line, valueAxis } from './chart-theme';

export interface NamedSeries {
  label: string;
  /** Values on the shared days. */
  values: Float64Array | (number | null)[];
}

/** Several curves on shared days (e.g. scenarios compared), told apart by colour and dash. */
export function MultiLineChart({ t, series, unit, limit, startDate, height = 320, label, testId }: {
  t: Float64Array | number[]; series: NamedSeries[]; unit: string; limit?: { value: number; label: string };
  startDate?: string | null; height?: number; label: string; testId?: string;
}) {
  const labels = series.map((s) => s.label).join('\u0000');
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [dayAxis(startDate), valueAxis(unit)],
      series: [daySeries(startDate), ...series.map((s, i) => line(s.label, SCENARIO_STYLES[i % SCENARIO_STYLES.length]!))],
      plugins: limit ? [horizontalLine(limit.value, palette.warning, limit.label)] : [],
    }),
    [labels, unit, startDate, limit?.value, limit?.label], // eslint-disable-line react-hooks/exhaustive-deps
  );
  const data = useMemo(() => [t, ...series.map((s) => s.values)] as uPlot.AlignedData, [t, series]);
  return <UplotChart options={options} data={data} height={height} label={label} testId={testId} />;
}
