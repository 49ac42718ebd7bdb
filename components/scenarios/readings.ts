/**
 * Number formats and the one-line plain readings beside each figure (PRODUCT.md: "R0 2.4 — each
 * case infects about 2.4 others at the start"). Shared by the scenario, forecast and overview screens.
 */
import { dayLabel } from '@/components/charts/chart-theme';

/** Significant-figure rounding for display: 2.4, 153.9, 1,240. */
export function fmt(v: number | null | undefined, digits = 3): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '−∞';
  const a = Math.abs(v);
  if (a >= 1000) return Math.round(v).toLocaleString('en');
  return String(Number(v.toPrecision(digits)));
}

/** Whole people: 1,240. */
export const people = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : Math.round(v).toLocaleString('en'));

/** A fraction as a percentage: 0.797 → "79.7%". */
export const pct = (v: number | null | undefined, digits = 3) => (v === null || v === undefined || !Number.isFinite(v) ? '—' : `${fmt(v * 100, digits)}%`);

/** "2.1–2.9" for a range, with ∞ for an open end. */
export const range = (r: readonly [number | null, number | null] | null | undefined, f: (v: number) => string = (v) => fmt(v)) =>
  !r ? '—' : `${r[0] === null ? '—' : f(r[0])}–${r[1] === null ? 'never' : Number.isFinite(r[1]) ? f(r[1]) : '∞'}`;

export const readR0 = (R0: number) =>
  R0 > 1
    ? `each case infects about ${fmt(R0, 2)} others at the start, when nobody is immune`
    : 'each case infects fewer than one other: the outbreak dies out on its own';

export const readPeak = (day: number, infectious: number, start?: string | null) =>
  `the most people ill at the same time, about ${people(infectious)}, around ${dayLabel(start, day)}`;

export const readFinalSize = (size: number, attack: number, days: number) =>
  `about ${people(size)} people, ${pct(attack, 2)} of the population, infected within ${days} days`;

export const readHerd = (h: number) =>
  h > 0 ? `${pct(h, 2)} of people must be immune (recovered or vaccinated) for cases to fall` : 'no immunity is needed: each case infects fewer than one other';

export const readDoubling = (d: number | null, when = 'at the start') =>
  d === null || !Number.isFinite(d) ? `cases are not growing ${when}` : `${when}, the number of cases doubles about every ${fmt(d, 2)} days`;

export const readBedsExceeded = (day: number | null | undefined, beds: number, start?: string | null) =>
  day === null || day === undefined ? `demand stays within the ${people(beds)} beds over the horizon` : `the ${people(beds)} beds are all taken from ${dayLabel(start, day)}`;

export const readBedPeak = (peak: number, beds: number) =>
  peak > beds ? `at most about ${people(peak)} beds needed at once — ${people(peak - beds)} more than there are` : `at most about ${people(peak)} of the ${people(beds)} beds occupied at once`;

export const readGrowth = (r: number) =>
  r > 0 ? `new cases grow by about ${pct(Math.expm1(r), 2)} a day` : r < 0 ? `new cases fall by about ${pct(-Math.expm1(r), 2)} a day` : 'new cases are flat';

export const readRt = (rt: number, lo: number, hi: number) =>
  lo > 1
    ? `each case currently infects about ${fmt(rt, 2)} others: still growing`
    : hi < 1
      ? `each case currently infects about ${fmt(rt, 2)} others: shrinking`
      : `each case currently infects about ${fmt(rt, 2)} others; the range includes 1, so growth or decline is not yet clear`;

/** A friendly step for "Use step X": the largest of 1, 0.5, 0.25, 0.2, 0.1, 0.05, … that is ≤ safe. */
export function niceStep(safe: number): number {
  const candidates = [1, 0.5, 0.25, 0.2, 0.1, 0.05, 0.025, 0.02, 0.01, 0.005, 0.0025, 0.002, 0.001, 0.0005, 0.0001];
  for (const c of candidates) if (c <= safe) return c;
  return Number(safe.toPrecision(2));
}
