'use client';
import { useMemo, useState } from 'react';
import { R0FromGrowth, doublingIntervalOf, growthRateFromCounts, estimateRt } from '@/lib/model';
import { RtChart } from '@/components/charts/rt-chart';
import { dayLabel } from '@/components/charts/chart-theme';
import { Figure } from '@/components/scenarios/figure';
import { NumberField } from '@/components/scenarios/number-field';
import { Notice } from '@/components/ui/notice';
import { fmt, range, readDoubling, readGrowth, readR0, readRt } from '@/components/scenarios/readings';
import { defaultGrowthWindow, type Observed } from './observed';

/** Growth on a chosen window: r, doubling time and R0 from growth (SIR and SEIR), each with its 95% interval. */
export function GrowthPanel({ observed, startDate }: { observed: Observed; startDate: string | null }) {
  const initial = defaultGrowthWindow(observed);
  const [win, setWin] = useState(initial ?? { from: 0, to: Math.max(0, observed.dataUntil) });
  const [period, setPeriod] = useState(3);
  const [latent, setLatent] = useState(2);
  const result = useMemo(() => {
    try {
      const from = Math.max(0, Math.round(win.from));
      const to = Math.min(observed.dataUntil, Math.round(win.to));
      return { g: growthRateFromCounts(observed.incidence, { from, to }), error: null };
    } catch (e) {
      return { g: null, error: e instanceof Error ? e.message.replace(/^growthRate: /, '') : 'no estimate' };
    }
  }, [observed, win]);
  const g = result.g;
  const gamma = period > 0 ? 1 / period : NaN;
  const sigma = latent > 0 ? 1 / latent : NaN;
  const sir = (r: number) => (gamma > 0 ? R0FromGrowth(r, { model: 'SIR', gamma }) : NaN);
  const seir = (r: number) => (gamma > 0 && sigma > 0 ? R0FromGrowth(r, { model: 'SEIR', gamma, sigma }) : NaN);
  const last = observed.dataUntil;
  const presets = [
    { label: 'From the first case', w: initial },
    { label: 'Last 14 days', w: last >= 2 ? { from: Math.max(0, last - 13), to: last } : null },
    { label: 'Last 7 days', w: last >= 2 ? { from: Math.max(0, last - 6), to: last } : null },
  ];
  return (
    <div className="flex flex-col gap-3" data-testid="growth">
      <div className="flex flex-wrap items-end gap-3">
        <div className="w-36"><NumberField label="Window from" unit="day" value={win.from} digits={6} testId="growth-from" onChange={(v) => v !== undefined && setWin((w) => ({ ...w, from: v }))} /></div>
        <div className="w-36"><NumberField label="to" unit="day" value={win.to} digits={6} testId="growth-to" onChange={(v) => v !== undefined && setWin((w) => ({ ...w, to: v }))} /></div>
        {presets.map((p) => p.w && (
          <button key={p.label} type="button" onClick={() => setWin(p.w!)}
            className="min-h-touch rounded-lg border-2 border-ink/30 bg-white px-3 font-bold hover:border-accent">{p.label}</button>
        ))}
      </div>
      <p className="text-sm text-ink/80">
        {dayLabel(startDate, win.from)} to {dayLabel(startDate, win.to)}. A Poisson log-linear fit to the daily counts of this window.
      </p>
      {result.error && <Notice tone="caution">No growth rate for this window: {result.error}.</Notice>}
      {g && (
        <div className="grid gap-x-6 md:grid-cols-2">
          <Figure testId="growth-r" label="Growth rate r (95% interval)" value={`${fmt(g.r)} per day (${range(g.interval)})`} reading={readGrowth(g.r)} />
          <Figure testId="growth-doubling" label="Doubling time (95% interval)"
            value={g.r > 0 ? `${fmt(g.doublingTime)} days (${range(doublingIntervalOf(g.interval))})` : 'not doubling'} reading={readDoubling(g.r > 0 ? g.doublingTime : null, 'in this window')} />
          <Figure testId="growth-R0-sir" label="R0 from growth, SIR (95% interval)" value={`${fmt(sir(g.r))} (${range([sir(g.interval[0]), sir(g.interval[1])])})`}
            reading={`with a ${fmt(period)}-day infectious period: ${readR0(sir(g.r))}`} />
          <Figure testId="growth-R0-seir" label="R0 from growth, SEIR (95% interval)" value={`${fmt(seir(g.r))} (${range([seir(g.interval[0]), seir(g.interval[1])])})`}
            reading={`adding a ${fmt(latent)}-day latent period: a longer generation gives a larger R0 for the same growth`} />
        </div>
      )}
      {g && g.dispersion > 2 && (
        <Notice tone="caution">
          The counts vary more than a Poisson model expects (dispersion {fmt(g.dispersion, 2)}); a wider interval allowing for it is
          {' '}{range(g.quasiInterval)} per day.
        </Notice>
      )}
      <div className="flex flex-wrap gap-3">
        <div className="w-44"><NumberField label="Infectious period" unit="days" value={period} onChange={(v) => v !== undefined && v > 0 && setPeriod(v)} /></div>
        <div className="w-44"><NumberField label="Latent period (SEIR)" unit="days" value={latent} onChange={(v) => v !== undefined && v > 0 && setLatent(v)} /></div>
      </div>
    </div>
  );
}

/** Rt over time by the renewal equation (Cori et al. 2013), with a serial interval of chosen mean and sd. */
export function RtPanel({ observed, startDate }: { observed: Observed; startDate: string | null }) {
  const [siMean, setSiMean] = useState(2.6);
  const [siSd, setSiSd] = useState(1.5);
  const [window, setWindow] = useState(7);
  const est = useMemo(() => {
    try {
      return { rows: estimateRt(observed.incidence, { siMean, siSd, window: Math.round(window) }), error: null };
    } catch (e) {
      return { rows: [], error: e instanceof Error ? e.message : 'no estimate' };
    }
  }, [observed, siMean, siSd, window]);
  const rows = est.rows;
  const current = rows.at(-1);
  return (
    <div className="flex flex-col gap-3" data-testid="rt">
      <div className="flex flex-wrap gap-3">
        <div className="w-44"><NumberField label="Serial interval, mean" unit="days" value={siMean} onChange={(v) => v !== undefined && setSiMean(v)} /></div>
        <div className="w-44"><NumberField label="Serial interval, sd" unit="days" value={siSd} onChange={(v) => v !== undefined && setSiSd(v)} /></div>
        <div className="w-36"><NumberField label="Window" unit="days" value={window} digits={4} onChange={(v) => v !== undefined && setWindow(v)} /></div>
      </div>
      {est.error && <Notice tone="caution">{est.error}</Notice>}
      {rows.length > 0 && (
        <RtChart day={rows.map((r) => r.day)} mean={rows.map((r) => r.mean)} lo={rows.map((r) => r.lo)} hi={rows.map((r) => r.hi)} startDate={startDate} />
      )}
      {current && (
        <Figure testId="rt-current" label={`Rt on ${dayLabel(startDate, current.day)} (95% interval)`} value={`${fmt(current.mean)} (${range([current.lo, current.hi])})`}
          reading={`${readRt(current.mean, current.lo, current.hi)}${current.cases < 12 ? ' — fewer than 12 cases in the window: read it with care' : ''}`} />
      )}
    </div>
  );
}
