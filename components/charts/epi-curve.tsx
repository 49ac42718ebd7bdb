'use client';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';
import type { EpiCurve } from '@/lib/tallies/curve';
import { UplotChart, type ChartOptions } from './uplot-chart';
import { dayToShortDate } from './chart-theme';

export interface EpiCurveChartProps {
  curve: EpiCurve;
  /** CSS pixels. */
  height?: number;
  /** What the curve covers, for the accessible label ("Alder Camp", "all sites"). */
  scopeLabel: string;
}

const toSec = (day: string) => Date.parse(`${day}T00:00:00Z`) / 1000;
const EPOCH = '1970-01-01';

/**
 * Daily incidence as bars, the 7-day average as a dashed line and cumulative cases (second axis)
 * as a solid line; a dashed marker at the cut-off with the days after it shaded, and a tick under
 * each day no site reported. Told apart by form (bars, dashed, solid), not by colour alone.
 */
export function EpiCurveChart({ curve, height = 300, scopeLabel }: EpiCurveChartProps) {
  const data = useMemo<uPlot.AlignedData>(() => [
    curve.days.map((d) => toSec(d.date)),
    curve.days.map((d) => d.cases),
    curve.days.map((d) => d.avg7),
    curve.days.map((d) => d.cumulative),
  ], [curve]);

  const options = useMemo(() => (U: typeof uPlot): ChartOptions => {
    const cutoff = curve.cutoff ? toSec(curve.cutoff) : null;
    const unreported = curve.days.filter((d) => !d.reported).map((d) => toSec(d.date));
    const half = 43_200;
    return {
      tzDate: (ts) => U.tzDate(new Date(ts * 1000), 'Etc/UTC'),
      scales: { x: { time: true, range: (_u, min, max) => [min - half, max + half] }, cases: { range: (_u, _min, max) => [0, Math.max(1, max * 1.1)] }, cum: { range: (_u, _min, max) => [0, Math.max(1, max * 1.05)] } },
      axes: [
        // "8 Nov", as on the other charts and in the tables (uPlot's default is "11/8").
        { stroke: palette.ink, grid: { stroke: '#0001' }, values: (_u, splits) => splits.map((s) => dayToShortDate(EPOCH, s / 86_400) ?? '') },
        { scale: 'cases', label: 'New cases per day', stroke: palette.ink, grid: { stroke: '#0001' }, size: 56 },
        { scale: 'cum', side: 1, label: 'Cumulative cases', stroke: palette.accent, grid: { show: false }, size: 64 },
      ],
      series: [
        { label: 'Day', value: (_u, v) => (v == null ? '' : new Date(v * 1000).toISOString().slice(0, 10)) },
        { label: 'New cases', scale: 'cases', fill: `${palette.infectious}CC`, stroke: palette.infectious, width: 1,
          paths: U.paths.bars!({ size: [0.7, 40] }), points: { show: false } },
        { label: '7-day average', scale: 'cases', stroke: palette.ink, width: 2.5, dash: [8, 5], points: { show: false }, spanGaps: false },
        { label: 'Cumulative', scale: 'cum', stroke: palette.accent, width: 2.5, points: { show: false } },
      ],
      legend: { show: true },
      hooks: {
        draw: [
          (u) => {
            const ctx = u.ctx;
            const { top, height: h, left, width } = u.bbox;
            ctx.save();
            if (cutoff !== null) {
              const x = Math.round(u.valToPos(cutoff + half, 'x', true));
              ctx.fillStyle = '#1D243312';
              ctx.fillRect(x, top, left + width - x, h);
              ctx.strokeStyle = palette.warning;
              ctx.lineWidth = 2 * devicePixelRatio;
              ctx.setLineDash([4 * devicePixelRatio, 4 * devicePixelRatio]);
              ctx.beginPath();
              ctx.moveTo(x, top);
              ctx.lineTo(x, top + h);
              ctx.stroke();
              ctx.setLineDash([]);
              ctx.fillStyle = palette.warning;
              ctx.font = `bold ${12 * devicePixelRatio}px sans-serif`;
              const text = 'last complete day';
              const pad = 4 * devicePixelRatio;
              // Left of the marker when the right margin is too narrow for the words.
              const fits = x + pad + ctx.measureText(text).width <= left + width;
              ctx.textAlign = fits ? 'left' : 'right';
              ctx.fillText(text, fits ? x + pad : x - pad, top + 14 * devicePixelRatio);
            }
            // A hollow tick under each day no site reported: "no report", not "no cases".
            ctx.strokeStyle = palette.ink;
            ctx.lineWidth = 1.5 * devicePixelRatio;
            for (const t of unreported) {
              const x = u.valToPos(t, 'x', true);
              ctx.strokeRect(x - 3 * devicePixelRatio, top + h - 7 * devicePixelRatio, 6 * devicePixelRatio, 6 * devicePixelRatio);
            }
            ctx.restore();
          },
        ],
      },
    };
  }, [curve]);

  const total = curve.days.at(-1)?.cumulative ?? 0;
  const label = `Epi curve, ${scopeLabel}: ${total} cases from ${curve.days[0]?.date ?? ''} to ${curve.days.at(-1)?.date ?? ''}; last complete day ${curve.cutoff ?? 'none yet'}.`;
  return (
    <figure className="flex flex-col gap-2">
      <UplotChart options={options} data={data} height={height} label={label} testId="epi-curve" />
      <figcaption className="text-sm text-ink/80">
        <span data-testid="epi-curve-total">
          <span className="num font-bold">{total.toLocaleString()}</span> cases in total
        </span>
        {' · '}
        {curve.cutoff ? (
          <>Last complete day <span className="num font-bold" data-testid="epi-curve-cutoff">{curve.cutoff}</span>: days after it (shaded) may be incomplete, because not every site has sent its tally yet.</>
        ) : (
          <>No day is complete yet: recent days may be incomplete until most sites have sent their tallies.</>
        )}
        {' '}A small square under a day means no site reported that day.
      </figcaption>
    </figure>
  );
}
