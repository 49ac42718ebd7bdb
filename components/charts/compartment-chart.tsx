'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { UplotChart } from './uplot-chart';
import { COMPARTMENT_STYLE, dayAxis, daySeries, line, valueAxis } from './chart-theme';

export interface CompartmentSeries {
  /** Days. */
  t: Float64Array;
  /** People. */
  S: Float64Array;
  E?: Float64Array;
  I: Float64Array;
  R: Float64Array;
  V?: Float64Array;
}

const NAMES = { S: 'Susceptible', E: 'Exposed', I: 'Infectious', R: 'Removed', V: 'Vaccinated' } as const;

/** The compartments of one Run, each with its colour and line style. */
export function CompartmentChart({ run, startDate, height = 320 }: { run: CompartmentSeries; startDate?: string | null; height?: number }) {
  const keys = useMemo(() => (['S', 'E', 'I', 'R', 'V'] as const).filter((k) => run[k] !== undefined), [run]);
  const shape = keys.join('');
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(
    () => ({
      scales: { x: { time: false } },
      axes: [dayAxis(startDate), valueAxis('people')],
      series: [daySeries(startDate), ...keys.map((k) => line(NAMES[k], COMPARTMENT_STYLE[k]))],
      legend: { show: true },
    }),
    // Rebuild only when the set of compartments or the day 0 changes; new runs update the data.
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [shape, startDate],
  );
  const data = useMemo(() => [run.t, ...keys.map((k) => run[k]!)] as uPlot.AlignedData, [run, keys]);
  return (
    <UplotChart
      options={options}
      data={data}
      height={height}
      testId="compartment-chart"
      label={`Compartments over ${run.t.length - 1} days: ${keys.map((k) => NAMES[k]).join(', ')}`}
    />
  );
}
