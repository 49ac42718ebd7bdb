/**
 * The key figures of a sitrep as text, written once: the page shows them and the e-mail summary
 * repeats them word for word, so the two can be compared (and are, in the end-to-end test).
 */
import { formatDay } from '@/lib/mail/format';
import type { SitrepData } from './types';

export interface KeyFigure {
  key: 'cutoff' | 'cases' | 'week' | 'growth' | 'doubling' | 'rt' | 'peak' | 'beds';
  label: string;
  value: string;
  /** Plain language beside the technical figure. */
  reading: string;
}

export const num = (v: number, digits = 0) =>
  Number.isFinite(v) ? v.toLocaleString('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits }) : '—';

const pct = (v: number) => `${v >= 0 ? '+' : '−'}${num(Math.abs(v * 100), 1)}%`;
const days = (v: number) => (Number.isFinite(v) ? `${num(v, 1)} days` : 'not doubling');

export function keyFigures(s: SitrepData): KeyFigure[] {
  const out: KeyFigure[] = [];
  out.push({
    key: 'cutoff', label: 'Data cut-off',
    value: s.cutoff ? formatDay(s.cutoff) : 'no complete day yet',
    reading: s.cutoff ? `the last day on which more than half the sites reported (${s.sitesReportingAtCutoff} of ${s.sitesInView})` : 'figures wait for a day most sites have reported',
  });
  out.push({ key: 'cases', label: 'Cases to date', value: num(s.casesToDate), reading: `in ${s.sites.length} sites, ${num((s.casesToDate / Math.max(1, s.outbreak.population)) * 1000, 1)} per 1,000 people` });
  const change = s.casesPrev7 > 0 ? (s.casesLast7 - s.casesPrev7) / s.casesPrev7 : null;
  out.push({
    key: 'week', label: 'Cases in the last 7 days', value: num(s.casesLast7),
    reading: change === null ? 'no earlier week to compare' : `${pct(change)} on the 7 days before (${num(s.casesPrev7)})`,
  });
  if (s.growth) {
    const g = s.growth;
    out.push({
      key: 'growth', label: 'Growth rate (95% interval)', value: `${num(g.r, 3)} per day (${num(g.interval[0], 3)} to ${num(g.interval[1], 3)})`,
      reading: g.r > 0 ? `daily cases grow by about ${num((Math.exp(g.r) - 1) * 100, 1)}% a day (${formatDay(g.fromDate)} to ${formatDay(g.toDate)})` : `daily cases are falling (${formatDay(g.fromDate)} to ${formatDay(g.toDate)})`,
    });
    out.push({
      key: 'doubling', label: 'Doubling time (95% interval)',
      value: Number.isFinite(g.doublingTime) ? `${days(g.doublingTime)} (${days(g.doublingInterval[0])} to ${Number.isFinite(g.doublingInterval[1]) ? days(g.doublingInterval[1]) : 'not doubling'})` : 'not doubling',
      reading: Number.isFinite(g.doublingTime) ? `at this pace daily cases double every ${num(g.doublingTime, 1)} days` : 'cases are not doubling',
    });
  }
  if (s.rt) {
    const r = s.rt;
    out.push({
      key: 'rt', label: `Rt on ${formatDay(r.date)} (95% interval)`, value: `${num(r.mean, 2)} (${num(r.lo, 2)} to ${num(r.hi, 2)})`,
      reading: r.lo > 1 ? 'each case currently infects more than one other: still spreading' : r.hi < 1 ? 'each case currently infects fewer than one other: receding' : 'about one: neither clearly growing nor receding',
    });
  }
  const f = s.forecast;
  if (f) {
    out.push({
      key: 'peak', label: `Forecast peak (${f.source === 'official' ? 'official forecast' : 'computed for this report'})`,
      value: `${formatDay(f.peak.date)}${f.banded ? ` (${formatDay(f.peak.range[0])} to ${formatDay(f.peak.range[1])})` : ''}`,
      reading: `about ${num(f.peak.infectious)} people infectious at once at the peak${f.banded ? ` (${num(f.peak.infectiousRange[0])} to ${num(f.peak.infectiousRange[1])})` : ''}`,
    });
    if (f.bedsExceeded && f.beds !== null) {
      const b = f.bedsExceeded;
      out.push({
        key: 'beds', label: `Beds (${num(f.beds)}) exceeded`,
        value: b.date ? formatDay(b.date) : b.earliest ? 'not in the central forecast' : 'not within the horizon',
        reading: b.date
          ? `earliest ${formatDay(b.earliest ?? b.date)}, latest ${b.latest ? formatDay(b.latest) : 'beyond the horizon'}`
          : b.earliest ? `possible from ${formatDay(b.earliest)} at the upper end of the band` : `bed demand stays within ${num(f.beds)} beds in the whole band`,
      });
    }
  }
  return out;
}
