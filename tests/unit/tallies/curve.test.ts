import { describe, expect, it } from 'vitest';
import { computeEpiCurve, curveRange, cutoffOf, MAX_CURVE_DAYS } from '@/lib/tallies/curve';
import { addDays } from '@/lib/tallies/dates';

describe('epi curve on the device', () => {
  it('sums per day, flags unreported days, averages 7 days and runs the cumulative sum [calc by hand]', () => {
    const s = '2025-05-01';
    const t = (d: number, n: number, deletedAt: string | null = null) => ({ date: addDays(s, d), newCases: n, deletedAt });
    const curve = computeEpiCurve([t(0, 2), t(0, 1), t(1, 4), t(3, 0), t(4, 6), t(5, 1), t(6, 7), t(7, 3), t(2, 50, '2025-05-04T00:00:00Z')], { startDate: s, today: addDays(s, 8), sitesInView: 2 });
    expect(curve.days.map((d) => d.cases)).toEqual([3, 4, 0, 0, 6, 1, 7, 3, 0]);
    expect(curve.days.map((d) => d.reported)).toEqual([true, true, false, true, true, true, true, true, false]);
    expect(curve.days.map((d) => d.cumulative)).toEqual([3, 7, 7, 7, 13, 14, 21, 24, 24]);
    // (3+4+0+0+6+1+7)/7 = 3; (4+0+0+6+1+7+3)/7 = 3; (0+0+6+1+7+3+0)/7 = 17/7
    expect(curve.days.map((d) => d.avg7)).toEqual([null, null, null, null, null, null, 3, 3, 17 / 7]);
    // Only day 0 had both sites: the cut-off.
    expect(curve.cutoff).toBe(s);
  });
  it('never takes today as complete and needs more than half of the sites', () => {
    const days = [{ date: '2025-01-01', reportingSites: 2 }, { date: '2025-01-02', reportingSites: 3 }, { date: '2025-01-03', reportingSites: 4 }];
    expect(cutoffOf(days, 4, '2025-01-03')).toBe('2025-01-02');
    expect(cutoffOf(days, 6, '2025-01-03')).toBe(null);
    expect(cutoffOf(days, 0, '2025-01-03')).toBe(null);
  });
  it('runs from day 0 to the later of today and the last tally, at most MAX_CURVE_DAYS long', () => {
    expect(curveRange('2025-01-01', '2025-01-05', '2025-01-10')).toEqual({ from: '2025-01-01', to: '2025-01-10' });
    expect(curveRange('2025-01-01', '2025-01-12', '2025-01-10')).toEqual({ from: '2025-01-01', to: '2025-01-12' });
    const long = curveRange('2000-01-01', null, '2025-01-10');
    expect(long.to).toBe('2025-01-10');
    expect(long.from).toBe(addDays('2025-01-10', -(MAX_CURVE_DAYS - 1)));
  });
});
