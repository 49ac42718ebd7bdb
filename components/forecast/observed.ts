/**
 * The outbreak's daily counts as the estimators need them: one number per day since day 0, up to the
 * data cut-off (the last complete day; later days are still coming in and would bias every estimate
 * downwards), and which days had any report at all.
 */
import type { EpiCurve } from '@/lib/tallies/curve';
import { daysBetween } from '@/lib/tallies/dates';

export interface Observed {
  /** New cases on day d (index d = days since day 0), people, for d = 0..dataUntil. */
  incidence: number[];
  /** True where at least one site reported that day (a 0 on an unreported day is "no report"). */
  reported: boolean[];
  /** Last day used, days since day 0 (the cut-off), or −1 without data. */
  dataUntil: number;
  /** `YYYY-MM-DD` of dataUntil, or null. */
  cutoffDate: string | null;
  /** Cases over the whole curve, including days after the cut-off, people. */
  casesToDate: number;
  /** First day with a case, or null. */
  firstCaseDay: number | null;
}

export function observedFromCurve(curve: EpiCurve | undefined, startDate: string | null | undefined): Observed | null {
  if (!curve || !startDate) return null;
  const lastDay = curve.cutoff ?? curve.days.filter((d) => d.date < curve.today).at(-1)?.date ?? null;
  const dataUntil = lastDay ? daysBetween(startDate, lastDay) : -1;
  const incidence: number[] = dataUntil >= 0 ? new Array<number>(dataUntil + 1).fill(0) : [];
  const reported: boolean[] = incidence.map(() => false);
  let casesToDate = 0;
  for (const d of curve.days) {
    casesToDate += d.cases;
    const k = daysBetween(startDate, d.date);
    if (k >= 0 && k <= dataUntil) {
      incidence[k] = d.cases;
      reported[k] = d.reported;
    }
  }
  const first = incidence.findIndex((v) => v > 0);
  return { incidence, reported, dataUntil, cutoffDate: lastDay, casesToDate, firstCaseDay: first >= 0 ? first : null };
}

/** The default early-growth window: from the first case, at most 21 days, up to the cut-off. */
export function defaultGrowthWindow(o: Observed): { from: number; to: number } | null {
  if (o.firstCaseDay === null || o.dataUntil - o.firstCaseDay < 2) return null;
  return { from: o.firstCaseDay, to: Math.min(o.dataUntil, o.firstCaseDay + 20) };
}
