/**
 * The epidemic curve of a set of tallies: daily incidence, the trailing 7-day average and the
 * cumulative count, plus the cut-off (the last complete day). The server computes the same in
 * SQL (lib/db/curve.ts); this pure version serves the device when it works from local data, and
 * the tests compare the two.
 */
import { addDays, dayRange, daysBetween } from './dates';

export interface EpiCurveDay {
  /** `YYYY-MM-DD`. */
  date: string;
  /** New cases that day, people (0 on a day no site reported). */
  cases: number;
  /** Mean of the daily cases over this day and the 6 before, people per day; null in the first 6 days. */
  avg7: number | null;
  /** Cases from the first day of the curve to this one, people. */
  cumulative: number;
  /** Sites that sent a tally for that day. */
  reportingSites: number;
  /** False when no site in view reported that day (its 0 is "no report", not "no cases"). */
  reported: boolean;
}

export interface EpiCurve {
  days: EpiCurveDay[];
  /** The last complete day (see `cutoffOf`), or null when no day is complete yet. */
  cutoff: string | null;
  /** Live sites in view (1 for a site curve). */
  sitesInView: number;
  /** The day the server (or device) took as today. */
  today: string;
  siteId: string | null;
}

/** Longest curve returned: about five years of days. Longer outbreaks are cut at the start. */
export const MAX_CURVE_DAYS = 1830;

/** Days a trailing average spans: this day and the 6 before. */
export const AVG_WINDOW = 7;

/**
 * The last complete day: the latest day before today on which more than half of the sites in view
 * reported. Today is never complete (counting is under way); "more than half" rather than "all"
 * because one silent site out of many would otherwise hold the cut-off back for ever, while a day
 * that half the sites have not yet sent is plainly still coming in.
 */
export function cutoffOf(days: ReadonlyArray<Pick<EpiCurveDay, 'date' | 'reportingSites'>>, sitesInView: number, today: string): string | null {
  if (sitesInView <= 0) return null;
  for (let i = days.length - 1; i >= 0; i--) {
    const d = days[i]!;
    if (d.date >= today) continue;
    if (d.reportingSites * 2 > sitesInView) return d.date;
  }
  return null;
}

/** The range of a curve: from the outbreak's day 0 to the later of today and the last tally. */
export function curveRange(startDate: string, lastTally: string | null, today: string): { from: string; to: string } {
  let from = startDate;
  const to = lastTally && lastTally > today ? lastTally : today;
  if (to < from) return { from: to, to: from };
  if (daysBetween(from, to) >= MAX_CURVE_DAYS) from = addDays(to, -(MAX_CURVE_DAYS - 1));
  return { from, to };
}

/** Adds the 7-day average, the running sum and the reported flag to daily totals in date order. */
export function finishCurve(daily: ReadonlyArray<{ date: string; cases: number; reportingSites: number }>): EpiCurveDay[] {
  let cumulative = 0;
  let window = 0;
  return daily.map((d, i) => {
    cumulative += d.cases;
    window += d.cases;
    if (i >= AVG_WINDOW) window -= daily[i - AVG_WINDOW]!.cases;
    return {
      date: d.date, cases: d.cases, reportingSites: d.reportingSites, reported: d.reportingSites > 0,
      avg7: i >= AVG_WINDOW - 1 ? window / AVG_WINDOW : null, cumulative,
    };
  });
}

/** The curve of `tallies` (live ones only) over `curveRange`, computed on the device. */
export function computeEpiCurve(
  tallies: ReadonlyArray<{ date: string; newCases: number; deletedAt?: string | null }>,
  opts: { startDate: string; today: string; sitesInView: number; siteId?: string | null },
): EpiCurve {
  const live = tallies.filter((t) => !t.deletedAt);
  const last = live.reduce<string | null>((m, t) => (m === null || t.date > m ? t.date : m), null);
  const { from, to } = curveRange(opts.startDate, last, opts.today);
  const byDay = new Map<string, { cases: number; sites: number }>();
  for (const t of live) {
    if (t.date < from || t.date > to) continue;
    const e = byDay.get(t.date) ?? { cases: 0, sites: 0 };
    e.cases += t.newCases;
    e.sites += 1;
    byDay.set(t.date, e);
  }
  const days = finishCurve(dayRange(from, to).map((date) => ({ date, cases: byDay.get(date)?.cases ?? 0, reportingSites: byDay.get(date)?.sites ?? 0 })));
  return { days, cutoff: cutoffOf(days, opts.sitesInView, opts.today), sitesInView: opts.sitesInView, today: opts.today, siteId: opts.siteId ?? null };
}
