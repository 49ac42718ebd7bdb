'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';
import { UplotChart } from './uplot-chart';
import { BAND_INNER, BAND_OUTER, dayAxis, daySeries, horizontalLine, line, valueAxis, verticalLine } from './chart-theme';

export interface Bands {
  p5: Float64Array;
  p25: Float64Array;
  p50: Float64Array;
  p75: Float64Array;
  p95: Float64Array;
}

export interface BandChartProps {
  /** Days. */
  t: Float64Array;
  bands: Bands;
  /** What the values are, for the axis ("people infectious", "beds"). */
  unit: string;
  /** Observed values drawn as points over the bands: days and values. */
  observed?: { day: number[]; value: number[] };
  /** A horizontal line, e.g. the beds available. */
  limit?: { value: number; label: string };
  /** The last day with data (a vertical line). */
  cutoff?: number;
  startDate?: string | null;
  height?: number;
  label: string;
  testId?: string;
}

/** A forecast band: p5–p95 and p25–p75 shaded, the median as a thick line, optional observed points. */
export function BandChart({ t, bands, unit, observed, limit, cutoff, startDate, height = 300, label, testId }: BandChartProps) {
  const hasObs = Boolean(observed && observed.day.length);
  const options = useMemo<Omit<uPlot.Options, 'width' | 'height'>>(() => {
    const thin = { stroke: 'rgba(196, 71, 58, 0.5)', width: 1 };
    const plugins: uPlot.Plugin[] = [];
    if (limit) plugins.push(horizontalLine(limit.value, palette.warning, limit.label));
    if (cutoff !== undefined) plugins.push(verticalLine(cutoff, palette.ink, 'data cut-off'));
    return {
      scales: { x: { time: false } },
      axes: [dayAxis(startDate), valueAxis(unit)],
      series: [
        daySeries(startDate),
        line('95th percentile', thin),
        line('75th percentile', { ...thin, dash: [4, 3] }),
        line('median', { stroke: palette.infectious, width: 3 }),
        line('25th percentile', { ...thin, dash: [4, 3] }),
        line('5th percentile', thin),
        ...(hasObs
          ? [line('observed', { stroke: palette.ink, width: 0 }, { paths: () => null, points: { show: true, size: 7, fill: palette.ink, stroke: palette.ink } })]
          : []),
      ],
      bands: [
        { series: [1, 5], fill: BAND_OUTER },
        { series: [2, 4], fill: BAND_INNER },
      ],
      plugins,
      // The five percentile lines would crowd a legend; the key below the chart says what is drawn.
      legend: { show: false },
    };
  }, [unit, startDate, hasObs, limit?.value, limit?.label, cutoff]); // eslint-disable-line react-hooks/exhaustive-deps

  const data = useMemo(() => {
    const cols: uPlot.AlignedData[number][] = [t, bands.p95, bands.p75, bands.p50, bands.p25, bands.p5];
    if (hasObs && observed) {
      const obs: (number | null)[] = Array.from(t, () => null);
      observed.day.forEach((d, i) => {
        const k = Math.round(d - (t[0] ?? 0));
        if (k >= 0 && k < obs.length) obs[k] = observed.value[i] ?? null;
      });
      cols.push(obs);
    }
    return cols as uPlot.AlignedData;
  }, [t, bands, observed, hasObs]);

  return (
    <figure className="flex flex-col gap-1">
      <UplotChart options={options} data={data} height={height} label={label} testId={testId} />
      <figcaption className="flex flex-wrap gap-x-4 gap-y-1 text-sm text-ink/80">
        <span><span aria-hidden className="mr-1 inline-block h-1 w-6 bg-infectious align-middle" />median</span>
        <span><span aria-hidden className="mr-1 inline-block h-3 w-6 align-middle" style={{ background: BAND_INNER }} />middle 50% of runs</span>
        <span><span aria-hidden className="mr-1 inline-block h-3 w-6 align-middle" style={{ background: BAND_OUTER }} />middle 90% of runs</span>
        {hasObs && <span><span aria-hidden className="mr-1 inline-block h-2 w-2 rounded-full bg-ink align-middle" />observed</span>}
        {limit && <span><span aria-hidden className="mr-1 inline-block w-6 border-t-2 border-dashed border-warning align-middle" />{limit.label}</span>}
        {cutoff !== undefined && <span><span aria-hidden className="mr-1 inline-block h-3 border-l-2 border-dotted border-ink align-middle" />last day with data</span>}
      </figcaption>
    </figure>
  );
}
