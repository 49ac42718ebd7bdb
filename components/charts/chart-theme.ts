/**
 * Shared looks of Ebbcast's uPlot charts: the palette, the line styles that tell curves apart
 * without colour (S solid, E dash-dot, I solid thick, R dashed, V dotted), and the day axis with
 * calendar dates when the outbreak's day 0 is known.
 */
import type uPlot from 'uplot';
import { palette } from '@/tailwind.config';

export interface LineStyle {
  stroke: string;
  /** CSS pixels. */
  width: number;
  /** Canvas dash pattern, CSS pixels; absent = solid. */
  dash?: number[];
}

export const COMPARTMENT_STYLE = {
  S: { stroke: palette.susceptible, width: 2 },
  E: { stroke: palette.exposed, width: 2, dash: [10, 4, 2, 4] },
  I: { stroke: palette.infectious, width: 3.5 },
  R: { stroke: palette.removed, width: 2, dash: [8, 5] },
  V: { stroke: palette.vaccinated, width: 2.5, dash: [2, 4] },
} satisfies Record<string, LineStyle>;

/** Styles for several scenarios on one chart: colour and dash both differ. */
export const SCENARIO_STYLES: LineStyle[] = [
  { stroke: palette.infectious, width: 3 },
  { stroke: palette.removed, width: 2.5, dash: [8, 5] },
  { stroke: palette.accent, width: 2.5, dash: [2, 4] },
  { stroke: palette.exposed, width: 2.5, dash: [10, 4, 2, 4] },
  { stroke: palette.vaccinated, width: 2, dash: [14, 6] },
  { stroke: palette.susceptible, width: 2, dash: [4, 3] },
];

const MS_PER_DAY = 86_400_000;

/** The calendar date of a day number, `YYYY-MM-DD` (day 0 = startDate). Whole days only. */
export function dayToIso(startDate: string, day: number): string {
  const t = Date.parse(`${startDate}T00:00:00Z`) + Math.floor(day) * MS_PER_DAY;
  return new Date(t).toISOString().slice(0, 10);
}

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** A short calendar date such as "14 Mar" for a day number; null without a start date. */
export function dayToShortDate(startDate: string | null | undefined, day: number): string | null {
  if (!startDate || !Number.isFinite(day)) return null;
  const iso = dayToIso(startDate, day);
  return `${Number(iso.slice(8, 10))} ${MONTHS[Number(iso.slice(5, 7)) - 1]}`;
}

/** "day 27 (14 Mar)" or "day 27". */
export function dayLabel(startDate: string | null | undefined, day: number): string {
  const d = Math.round(day);
  const date = dayToShortDate(startDate, d);
  return date ? `day ${d} (${date})` : `day ${d}`;
}

/** Days between day 0 and a calendar date (whole days). */
export function isoToDay(startDate: string, iso: string): number {
  return Math.round((Date.parse(`${iso}T00:00:00Z`) - Date.parse(`${startDate}T00:00:00Z`)) / MS_PER_DAY);
}

const AXIS = { stroke: palette.ink, grid: { stroke: '#00000014' }, ticks: { stroke: '#00000030' }, font: '13px sans-serif' };

/** The x axis in days, with the calendar date under each tick when day 0 is known. */
export function dayAxis(startDate: string | null | undefined): uPlot.Axis {
  return {
    ...AXIS,
    label: startDate ? 'day (date)' : 'day',
    labelFont: 'bold 13px sans-serif',
    size: startDate ? 56 : 40,
    values: (_u, splits) => splits.map((d) => {
      const date = dayToShortDate(startDate, d);
      return date ? `${d}\n${date}` : String(d);
    }),
  };
}

/** A y axis with a label and compact numbers. */
export function valueAxis(label: string, opts: Partial<uPlot.Axis> = {}): uPlot.Axis {
  return {
    ...AXIS,
    label,
    labelFont: 'bold 13px sans-serif',
    size: 60,
    values: (_u, splits) => splits.map((v) => compact(v)),
    ...opts,
  };
}

/** 1234 → "1,234", 25000 → "25k". */
export function compact(v: number): string {
  const a = Math.abs(v);
  if (a >= 1e6) return `${+(v / 1e6).toPrecision(3)}M`;
  if (a >= 1e4) return `${+(v / 1e3).toPrecision(3)}k`;
  if (a >= 100 || Number.isInteger(v)) return Math.round(v).toLocaleString('en');
  return String(+v.toPrecision(3));
}

/** Series options from a LineStyle. */
export function line(label: string, style: LineStyle, extra: Partial<uPlot.Series> = {}): uPlot.Series {
  return {
    label,
    stroke: style.stroke,
    width: style.width,
    ...(style.dash ? { dash: style.dash } : {}),
    points: { show: false },
    value: (_u, v) => (v == null ? '—' : compact(v)),
    ...extra,
  };
}

/** The x series (days). */
export const daySeries = (startDate: string | null | undefined): uPlot.Series => ({
  label: 'day',
  value: (_u, v) => (v == null ? '—' : dayLabel(startDate, v)),
});

/** A horizontal line at y = value (e.g. the beds available), drawn after the series. */
export function horizontalLine(value: number, color: string, text: string): uPlot.Plugin {
  return {
    hooks: {
      draw: [
        (u) => {
          const y = u.valToPos(value, 'y', true);
          if (!Number.isFinite(y) || y < u.bbox.top || y > u.bbox.top + u.bbox.height) return;
          const ctx = u.ctx;
          ctx.save();
          ctx.strokeStyle = color;
          ctx.lineWidth = 2 * devicePixelRatio;
          ctx.setLineDash([6 * devicePixelRatio, 4 * devicePixelRatio]);
          ctx.beginPath();
          ctx.moveTo(u.bbox.left, y);
          ctx.lineTo(u.bbox.left + u.bbox.width, y);
          ctx.stroke();
          ctx.setLineDash([]);
          ctx.fillStyle = color;
          ctx.font = `bold ${12 * devicePixelRatio}px sans-serif`;
          // Right-aligned, clear of the y axis labels.
          const w = ctx.measureText(text).width;
          ctx.fillText(text, u.bbox.left + u.bbox.width - w - 6 * devicePixelRatio, y - 5 * devicePixelRatio);
          ctx.restore();
        },
      ],
    },
  };
}

/** A vertical line at x = day (e.g. the data cut-off). */
export function verticalLine(day: number, color: string, text: string): uPlot.Plugin {
  return {
    hooks: {
      draw: [
        (u) => {
          const x = u.valToPos(day, 'x', true);
          if (!Number.isFinite(x) || x < u.bbox.left || x > u.bbox.left + u.bbox.width) return;
          const ctx = u.ctx;
          ctx.save();
          ctx.strokeStyle = color;
          ctx.lineWidth = 1.5 * devicePixelRatio;
          ctx.setLineDash([3 * devicePixelRatio, 3 * devicePixelRatio]);
          ctx.beginPath();
          ctx.moveTo(x, u.bbox.top);
          ctx.lineTo(x, u.bbox.top + u.bbox.height);
          ctx.stroke();
          ctx.setLineDash([]);
          ctx.fillStyle = color;
          ctx.font = `bold ${12 * devicePixelRatio}px sans-serif`;
          ctx.fillText(text, x + 4 * devicePixelRatio, u.bbox.top + 14 * devicePixelRatio);
          ctx.restore();
        },
      ],
    },
  };
}

export const BAND_OUTER = 'rgba(196, 71, 58, 0.16)';
export const BAND_INNER = 'rgba(196, 71, 58, 0.30)';
