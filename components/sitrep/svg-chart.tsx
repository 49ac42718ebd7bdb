/**
 * Charts of the sitrep as plain SVG rendered on the server: they print sharply on A4, need no
 * script, and look the same on screen, on paper and in a PDF. Series are told apart by line style
 * as well as colour (PRODUCT.md, "Look and feel").
 */
import { formatDay } from '@/lib/mail/format';

export interface SvgSeries {
  label: string;
  values: Array<number | null>;
  color: string;
  kind: 'bars' | 'line' | 'band';
  /** For bands: the upper edge (values is the lower edge). */
  upper?: Array<number | null>;
  dash?: 'solid' | 'dashed' | 'dotted';
  /** Draw against the right-hand axis. */
  right?: boolean;
}

export interface SvgChartProps {
  title: string;
  /** `YYYY-MM-DD` per x position. */
  dates: string[];
  series: SvgSeries[];
  yLabel: string;
  rightLabel?: string;
  /** Horizontal reference lines (e.g. beds, Rt = 1). */
  refs?: Array<{ value: number; label: string; color: string; right?: boolean }>;
  /** Vertical markers (e.g. the data cut-off). */
  marks?: Array<{ date: string; label: string }>;
  height?: number;
  testId?: string;
}

const W = 720;
const PAD = { l: 52, r: 52, t: 14, b: 36 };
const DASH = { solid: undefined, dashed: '7 4', dotted: '2 3' } as const;

function niceMax(v: number): number {
  if (!(v > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(v));
  for (const m of [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10]) if (m * p >= v) return m * p;
  return 10 * p;
}

const fmtTick = (v: number) => (v >= 1000 ? `${Math.round(v / 100) / 10}k` : Number.isInteger(v) ? String(v) : v.toFixed(1));

export function SvgChart({ title, dates, series, yLabel, rightLabel, refs = [], marks = [], height = 240, testId }: SvgChartProps) {
  const H = height;
  const n = Math.max(1, dates.length);
  const iw = W - PAD.l - PAD.r;
  const ih = H - PAD.t - PAD.b;
  const maxOf = (right: boolean) => {
    let m = 0;
    for (const s of series) {
      if (Boolean(s.right) !== right) continue;
      for (const v of [...s.values, ...(s.upper ?? [])]) if (v !== null && Number.isFinite(v)) m = Math.max(m, v);
    }
    for (const r of refs) if (Boolean(r.right) === right) m = Math.max(m, r.value * 1.1);
    return niceMax(m);
  };
  const yMax = maxOf(false);
  const rMax = maxOf(true);
  const slot = iw / n;
  const x = (i: number) => PAD.l + slot * (i + 0.5);
  const y = (v: number, right = false) => PAD.t + ih - (Math.max(0, v) / (right ? rMax : yMax)) * ih;
  const path = (vals: Array<number | null>, right?: boolean) => {
    let d = '';
    let pen = false;
    vals.forEach((v, i) => {
      if (v === null || !Number.isFinite(v)) {
        pen = false;
        return;
      }
      d += `${pen ? 'L' : 'M'}${x(i).toFixed(1)},${y(v, right).toFixed(1)}`;
      pen = true;
    });
    return d;
  };
  const ticks = [0, 0.25, 0.5, 0.75, 1];
  const every = Math.max(1, Math.ceil(n / 8));
  const hasRight = series.some((s) => s.right) || refs.some((r) => r.right);

  return (
    <figure className="sitrep-chart break-inside-avoid" data-testid={testId}>
      <svg viewBox={`0 0 ${W} ${H}`} width="100%" role="img" aria-label={title} className="block h-auto w-full">
        <rect x={PAD.l} y={PAD.t} width={iw} height={ih} fill="#ffffff" stroke="#d8d3c4" />
        {ticks.map((f) => (
          <g key={f}>
            <line x1={PAD.l} x2={PAD.l + iw} y1={PAD.t + ih - f * ih} y2={PAD.t + ih - f * ih} stroke="#ece8dc" />
            <text x={PAD.l - 6} y={PAD.t + ih - f * ih + 4} textAnchor="end" fontSize="11" fill="#1D2433">{fmtTick(f * yMax)}</text>
            {hasRight && <text x={PAD.l + iw + 6} y={PAD.t + ih - f * ih + 4} fontSize="11" fill="#1D2433">{fmtTick(f * rMax)}</text>}
          </g>
        ))}
        {dates.map((d, i) => (i % every === 0 ? (
          <text key={d} x={x(i)} y={H - PAD.b + 16} textAnchor="middle" fontSize="11" fill="#1D2433">{formatDay(d).replace(/ \d{4}$/, '')}</text>
        ) : null))}
        <text x={12} y={PAD.t + ih / 2} fontSize="11" fill="#1D2433" transform={`rotate(-90 12 ${PAD.t + ih / 2})`} textAnchor="middle">{yLabel}</text>
        {rightLabel && <text x={W - 8} y={PAD.t + ih / 2} fontSize="11" fill="#1D2433" transform={`rotate(90 ${W - 8} ${PAD.t + ih / 2})`} textAnchor="middle">{rightLabel}</text>}
        {series.map((s) => {
          if (s.kind === 'bars') {
            return (
              <g key={s.label} fill={s.color}>
                {s.values.map((v, i) => (v === null || !(v > 0) ? null : (
                  <rect key={i} x={x(i) - slot * 0.4} width={slot * 0.8} y={y(v, s.right)} height={PAD.t + ih - y(v, s.right)} />
                )))}
              </g>
            );
          }
          if (s.kind === 'band' && s.upper) {
            const lo = s.values.map((v, i) => [i, v] as const).filter(([, v]) => v !== null && Number.isFinite(v));
            const hi = s.upper.map((v, i) => [i, v] as const).filter(([, v]) => v !== null && Number.isFinite(v)).reverse();
            if (!lo.length) return null;
            const d = [...lo, ...hi].map(([i, v], k) => `${k ? 'L' : 'M'}${x(i).toFixed(1)},${y(v!, s.right).toFixed(1)}`).join('') + 'Z';
            return <path key={s.label} d={d} fill={s.color} fillOpacity={0.22} stroke="none" />;
          }
          return <path key={s.label} d={path(s.values, s.right)} fill="none" stroke={s.color} strokeWidth={2.2} strokeDasharray={DASH[s.dash ?? 'solid']} />;
        })}
        {refs.map((r) => (
          <g key={r.label}>
            <line x1={PAD.l} x2={PAD.l + iw} y1={y(r.value, r.right)} y2={y(r.value, r.right)} stroke={r.color} strokeWidth={1.6} strokeDasharray="8 3 2 3" />
            <text x={PAD.l + 4} y={y(r.value, r.right) - 4} fontSize="11" fill={r.color} fontWeight="bold">{r.label}</text>
          </g>
        ))}
        {marks.map((m) => {
          const i = dates.indexOf(m.date);
          if (i < 0) return null;
          return (
            <g key={m.label}>
              <line x1={x(i) + slot / 2} x2={x(i) + slot / 2} y1={PAD.t} y2={PAD.t + ih} stroke="#1D2433" strokeDasharray="3 3" />
              <text x={x(i) + slot / 2 - 4} y={PAD.t + 12} textAnchor="end" fontSize="11" fill="#1D2433">{m.label}</text>
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-xs">
        {series.map((s) => (
          <span key={s.label} className="inline-flex items-center gap-1">
            <svg width="22" height="10" aria-hidden>
              {s.kind === 'bars' ? <rect width="22" height="10" fill={s.color} /> : s.kind === 'band' ? <rect width="22" height="10" fill={s.color} fillOpacity={0.22} /> : (
                <line x1="0" x2="22" y1="5" y2="5" stroke={s.color} strokeWidth="2.2" strokeDasharray={DASH[s.dash ?? 'solid']} />
              )}
            </svg>
            {s.label}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}
