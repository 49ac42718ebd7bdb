import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { parseCount, parseTallyCsv, serialiseTallyCsv, validateTallyRows, type CsvTally } from '@/lib/tallies/csv';
import { parseTallyForm, EMPTY_FORM } from '@/lib/tallies/form';
import { addDays, daysBetween, localToday } from '@/lib/tallies/dates';

const SITES = [{ id: '00000000-0000-4000-8000-000000000001', name: 'Alder Camp' }, { id: '00000000-0000-4000-8000-000000000002', name: 'Reed, "Ward"' }];
const ctx = { sites: SITES, startDate: '2025-01-01', today: '2025-12-31', existing: () => undefined };

describe('CSV parsing', () => {
  it('counts lines from the file, across quoted notes that span lines, blank lines and a BOM', () => {
    const text = '\uFEFFSite,Date,New cases\nAlder Camp,2025-01-02,1\n\n"Alder Camp",2025-01-03,2\n';
    const p = parseTallyCsv(text.replace('New cases', 'New cases,note').replace(',1\n', ',1,"a\nb"\n').replace(',2\n', ',2,\n'));
    expect(p.issues).toEqual([]);
    expect(p.rows.map((r) => [r.line, r.cells.site, r.cells.note])).toEqual([[2, 'Alder Camp', 'a\nb'], [5, 'Alder Camp', '']]);
  });
  it('reads counts strictly', () => {
    expect(parseCount('12', 'x')).toEqual({ ok: true, value: 12 });
    expect(parseCount(' ', 'x')).toEqual({ ok: true, value: null });
    expect(parseCount('1e3', 'x')).toEqual({ ok: true, value: 1000 });
    for (const [s, code] of [['1,000', 'count_not_number'], ['12 people', 'count_not_number'], ['-1', 'count_negative'], ['0.5', 'count_not_integer'], ['2e9', 'count_too_large']] as const) {
      expect(parseCount(s, 'x')).toMatchObject({ ok: false, code });
    }
  });
  it("escapes formulae for spreadsheets and still reads back notes that start with an apostrophe", () => {
    const rows: CsvTally[] = ["=SUM(A1)", "'=x", "'plain", '+1', '@me'].map((note, i) => ({ siteName: 'Alder Camp', date: addDays('2025-02-01', i), newCases: 1, recoveries: null, deaths: null, admissions: null, note }));
    const text = serialiseTallyCsv(rows);
    expect(text).toContain("'=SUM(A1)");
    const back = validateTallyRows(parseTallyCsv(text), ctx).valid.map((v) => v.input.note);
    expect(back).toEqual(["=SUM(A1)", "'=x", "'plain", '+1', '@me']);
  });

  it('reads back what it writes, for any tallies (property)', () => {
    const note = fc.option(fc.oneof(fc.string({ maxLength: 40 }), fc.constantFrom("'=x", '=1+1', '-note', "''")).filter((s) => s.trim() === s && s !== '' && !/[\u0000-\u001f\u007f\u202a-\u202e\u2066-\u2069]/.test(s)), { nil: null });
    const count = fc.option(fc.nat({ max: 100000 }), { nil: null });
    const tally = fc.record({ site: fc.constantFrom(0, 1), day: fc.nat({ max: 300 }), newCases: fc.nat({ max: 100000 }), recoveries: count, deaths: count, admissions: count, note });
    fc.assert(fc.property(fc.uniqueArray(tally, { selector: (t) => `${t.site}|${t.day}`, maxLength: 30 }), (ts) => {
      const rows: CsvTally[] = ts.map((t) => ({ siteName: SITES[t.site]!.name, date: addDays('2025-01-01', t.day), newCases: t.newCases, recoveries: t.recoveries, deaths: t.deaths, admissions: t.admissions, note: t.note }));
      const report = validateTallyRows(parseTallyCsv(serialiseTallyCsv(rows)), ctx);
      expect(report.issues).toEqual([]);
      expect(report.valid.map((v) => ({ siteName: v.siteName, date: v.input.date, newCases: v.input.newCases, recoveries: v.input.recoveries, deaths: v.input.deaths, admissions: v.input.admissions, note: v.input.note }))).toEqual(rows);
    }), { numRuns: 200 });
  });
});

describe('entry form parsing', () => {
  const base = { siteId: SITES[0]!.id, date: '2025-03-01', today: '2025-03-01', startDate: '2025-01-01' };
  it('gives one specific message per bad field', () => {
    const r = parseTallyForm({ ...EMPTY_FORM, newCases: '', deaths: '-2', admissions: '1.5', recoveries: 'lots' }, base);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors).toEqual({ newCases: 'Required: write 0 when there were no new cases.', deaths: 'Cannot be negative.', admissions: 'Must be a whole number.', recoveries: 'Must be a number.' });
    const f = parseTallyForm({ ...EMPTY_FORM, newCases: '3' }, { ...base, date: '2025-03-02' });
    expect(f.ok === false && f.errors.date).toMatch(/after today/);
  });
  it('accepts 0 as a real value and blanks as unknown', () => {
    const r = parseTallyForm({ ...EMPTY_FORM, newCases: '0' }, base);
    expect(r).toEqual({ ok: true, input: { siteId: base.siteId, date: base.date, newCases: 0, recoveries: null, deaths: null, admissions: null, note: null, baseVersion: null } });
  });
});

describe('calendar days', () => {
  it('takes the device’s local day, and moves days without drift', () => {
    // 23:30 on 14 March local time is still 14 March, whatever UTC says.
    expect(localToday(new Date(2026, 2, 14, 23, 30))).toBe('2026-03-14');
    expect(addDays('2026-03-28', 2)).toBe('2026-03-30');
    expect(addDays('2024-02-28', 1)).toBe('2024-02-29');
    expect(daysBetween('2025-12-31', '2026-03-01')).toBe(60);
  });
});
