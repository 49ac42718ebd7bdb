/**
 * CSV import and export through the real routes and a real SQLite file: a file with 17 kinds of bad
 * row (each reported with its line and reason, nothing written), a clean file (every row written,
 * in one transaction), export → re-import round trip, and the size and row limits.
 */
import { call, prepare, sessionCookie } from '../helpers/server';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import Papa from 'papaparse';
import { beforeAll, describe, expect, it } from 'vitest';
import type { Actor } from '@/lib/auth/actor';

const fixture = (name: string) => readFileSync(path.join(process.cwd(), 'tests/fixtures', name), 'utf8');

let coordinator: Actor;
let coordinatorCookie: string, fieldCookie: string;
let outbreakId: string;

async function freshCoordinator(): Promise<Actor> {
  const { User } = await import('@/models');
  const { loadActor } = await import('@/lib/db/users');
  const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
  return (await loadActor(u.id, u.sessionVersion))!;
}

/** A new outbreak (day 0 = 2025-01-01) with the three sites the fixtures name. */
async function csvOutbreak(name: string): Promise<string> {
  const { createOutbreak, createSite } = await import('@/lib/db/outbreaks');
  const o = await createOutbreak(coordinator, { name, disease: 'ILI', area: 'Test', population: 3000, startDate: '2025-01-01' });
  coordinator = await freshCoordinator();
  for (const s of ['Quarry Camp', 'Mill School', 'Reed Ward']) await createSite(coordinator, { outbreakId: o.id, name: s, kind: 'camp', population: 1000 });
  return o.id;
}

async function siteIdOf(oid: string, name: string): Promise<string> {
  const { Site } = await import('@/models');
  return (await Site.findOne({ where: { outbreakId: oid, name } }))!.id;
}

async function importCsv(oid: string, text: string | Uint8Array, opts: { mode?: 'preview' | 'commit'; expect?: number; cookie?: string; contentType?: string } = {}) {
  const { POST } = await import('@/app/api/outbreaks/[id]/tallies/import/route');
  const q = new URLSearchParams({ mode: opts.mode ?? 'preview', ...(opts.expect !== undefined ? { expect: String(opts.expect) } : {}) });
  return call(POST as never, `/api/outbreaks/${oid}/tallies/import?${q}`, {
    method: 'POST', cookie: opts.cookie ?? coordinatorCookie, params: { id: oid }, rawBody: text, contentType: opts.contentType ?? 'text/csv',
  });
}

async function exportCsv(oid: string): Promise<string> {
  const { GET } = await import('@/app/api/outbreaks/[id]/tallies/export/route');
  const r = await call(GET as never, `/api/outbreaks/${oid}/tallies/export`, { cookie: coordinatorCookie, params: { id: oid } });
  expect(r.status).toBe(200);
  expect(r.headers.get('content-type')).toMatch(/text\/csv/);
  return r.body as string;
}

async function liveCount(oid: string): Promise<number> {
  const { Tally } = await import('@/models');
  return Tally.count({ where: { outbreakId: oid, deletedAt: null } });
}

/** CSV rows as comparable objects (blank optional cells → null), sorted by site and day. */
function rowsOf(text: string) {
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: 'greedy' });
  const opt = (s: string | undefined) => (s === undefined || s === '' ? null : Number(s));
  return parsed.data
    .map((r) => ({ site: r.site, date: r.date, newCases: Number(r.newCases), recoveries: opt(r.recoveries), deaths: opt(r.deaths), admissions: opt(r.admissions), note: r.note ? r.note.replace(/^'(?=[=+\-@])/, '') : null }))
    .sort((a, b) => `${a.site}|${a.date}`.localeCompare(`${b.site}|${b.date}`));
}

beforeAll(async () => {
  await prepare();
  coordinator = await freshCoordinator();
  coordinatorCookie = await sessionCookie('coordinator@marrowbend.example');
  fieldCookie = await sessionCookie('field@marrowbend.example');
  outbreakId = await csvOutbreak('CSV check');
  const { upsertTally } = await import('@/lib/db/tallies');
  const reed = await siteIdOf(outbreakId, 'Reed Ward');
  await upsertTally(coordinator, { siteId: reed, date: '2025-01-05', newCases: 2 }, { deviceId: null });
  await upsertTally(coordinator, { siteId: reed, date: '2025-01-07', newCases: 2 }, { deviceId: null });
});

describe('a file of bad rows', () => {
  // Line of the file → the reason code expected there (line 18's quoted note spans lines 18–19).
  const EXPECTED: [number, string, string | null][] = [
    [2, 'site_missing', 'site'],
    [3, 'site_unknown', 'site'],
    [4, 'date_missing', 'date'],
    [5, 'date_format', 'date'],
    [6, 'date_invalid', 'date'],
    [7, 'date_future', 'date'],
    [8, 'date_before_start', 'date'],
    [9, 'count_missing', 'newCases'],
    [10, 'count_not_number', 'newCases'],
    [11, 'count_negative', 'newCases'],
    [12, 'count_not_integer', 'newCases'],
    [13, 'count_too_large', 'newCases'],
    [14, 'note_too_long', 'note'],
    [15, 'note_control_chars', 'note'],
    [16, 'duplicate_in_file', null],
    [17, 'duplicate_in_file', null],
    [18, 'conflict_existing', null],
    [20, 'field_count', null],
    [21, 'count_not_number', 'admissions'],
  ];

  it('reports every bad row with its line, column, value and reason, and writes nothing', async () => {
    const before = await liveCount(outbreakId);
    const r = await importCsv(outbreakId, fixture('tallies-bad.csv'));
    expect(r.status).toBe(200);
    const report = r.body.report;
    expect(report.rows).toBe(20);
    expect(report.validCount).toBe(0);
    // Line 22 equals the tally already recorded: agreement, not an error.
    expect(report.unchangedCount).toBe(1);
    const got = report.issues.map((i: { line: number; code: string; column: string | null }) => [i.line, i.code, i.column]);
    expect(got).toEqual(EXPECTED);
    for (const i of report.issues) expect(i.reason.length).toBeGreaterThan(10);
    expect(report.issues.find((i: { line: number }) => i.line === 10).value).toBe('three');
    expect(report.issues.find((i: { line: number }) => i.line === 16).reason).toMatch(/also on line 17/);
    expect(Object.keys(report.kinds).length).toBeGreaterThanOrEqual(15);
    expect(await liveCount(outbreakId)).toBe(before);
    // "Import the valid rows" with none valid writes nothing either.
    const commit = await importCsv(outbreakId, fixture('tallies-bad.csv'), { mode: 'commit', expect: 0 });
    expect(commit.status).toBe(200);
    expect(commit.body.report.imported).toBe(0);
    expect(await liveCount(outbreakId)).toBe(before);
  });

  it('refuses a header without a required column as a whole', async () => {
    const r = await importCsv(outbreakId, 'site,day,cases\nQuarry Camp,2025-01-05,3\n');
    expect(r.body.report.fatal).toBe(true);
    expect(r.body.report.issues.map((i: { code: string; column: string }) => `${i.code}:${i.column}`)).toEqual(
      expect.arrayContaining(['missing_column:date', 'missing_column:newCases', 'unknown_column:day', 'unknown_column:cases']),
    );
    const c = await importCsv(outbreakId, 'site,day,cases\nQuarry Camp,2025-01-05,3\n', { mode: 'commit' });
    expect(c.status).toBe(422);
  });
});

describe('a clean file', () => {
  it('imports every row in one go, and a second import finds them all unchanged', async () => {
    const oid = await csvOutbreak('CSV clean');
    const text = fixture('tallies-clean.csv');
    const preview = await importCsv(oid, text);
    expect(preview.body.report).toMatchObject({ rows: 30, validCount: 30, issuesTotal: 0, unchangedCount: 0 });
    expect(await liveCount(oid)).toBe(0);
    const commit = await importCsv(oid, text, { mode: 'commit', expect: 30 });
    expect(commit.status).toBe(200);
    expect(commit.body.report.imported).toBe(30);
    expect(await liveCount(oid)).toBe(30);
    const { listTalliesByOutbreak } = await import('@/lib/db/tallies');
    const mill = await siteIdOf(oid, 'Mill School');
    const row = (await listTalliesByOutbreak(coordinator, oid, { siteId: mill, from: '2025-01-19', to: '2025-01-19' })).rows[0]!;
    expect(row).toMatchObject({ newCases: 10, recoveries: 5, deaths: 0, admissions: null, note: 'first line\nsecond line', version: 1, recordedBy: coordinator.id });
    const again = await importCsv(oid, text, { mode: 'commit', expect: 0 });
    expect(again.body.report).toMatchObject({ imported: 0, unchangedCount: 30 });
    expect(await liveCount(oid)).toBe(30);
    // The import is on the sync ledger.
    const { listLedger } = await import('@/lib/db/ledger');
    const led = await listLedger({ outbreakId: oid, kind: 'tally_import' });
    expect(led.rows[led.rows.length - 1]!.counts).toMatchObject({ rows: 30, imported: 30 });
  });

  it('writes nothing when the data changed since the preview (409)', async () => {
    const oid = await csvOutbreak('CSV race');
    const text = fixture('tallies-clean.csv');
    const preview = await importCsv(oid, text);
    const { upsertTally } = await import('@/lib/db/tallies');
    await upsertTally(coordinator, { siteId: await siteIdOf(oid, 'Quarry Camp'), date: '2025-01-10', newCases: 7 }, { deviceId: null });
    const commit = await importCsv(oid, text, { mode: 'commit', expect: preview.body.report.validCount });
    expect(commit.status).toBe(409);
    expect(await liveCount(oid)).toBe(1);
  });
});

describe('export and re-import', () => {
  it('gives back the same data', async () => {
    const x = await csvOutbreak('CSV round trip X');
    const text = fixture('tallies-clean.csv');
    await importCsv(x, text, { mode: 'commit' });
    const out = await exportCsv(x);
    expect(out.split('\n')[0]).toBe('site,date,newCases,recoveries,deaths,admissions,note');
    // The formula-like note is escaped for spreadsheets on the way out…
    expect(out).toContain("'=SUM(A1:A3)");
    expect(rowsOf(out)).toEqual(rowsOf(text));
    // …and read back as written.
    const y = await csvOutbreak('CSV round trip Y');
    const r = await importCsv(y, out, { mode: 'commit' });
    expect(r.body.report).toMatchObject({ imported: 30, issuesTotal: 0 });
    const back = await exportCsv(y);
    expect(back).toBe(out);
    const { listTalliesByOutbreak } = await import('@/lib/db/tallies');
    const reed = await siteIdOf(y, 'Reed Ward');
    expect((await listTalliesByOutbreak(coordinator, y, { siteId: reed, from: '2025-01-16', to: '2025-01-16' })).rows[0]!.note).toBe('=SUM(A1:A3)');
  });
});

describe('limits and refusals', () => {
  it('refuses more than 5 MB with 413 and more than 100,000 rows with 422, writing nothing', async () => {
    const before = await liveCount(outbreakId);
    const big = 'site,date,newCases,recoveries,deaths,admissions,note\n' + `Quarry Camp,2025-01-05,1,,,,${'n'.repeat(200)}\n`.repeat(26_000);
    expect(Buffer.byteLength(big)).toBeGreaterThan(5 * 1024 * 1024);
    const r = await importCsv(outbreakId, big);
    expect(r.status).toBe(413);
    expect(r.body.error.message).toMatch(/5 MB/);
    const many = 'site,date,newCases\n' + 'Quarry Camp,2025-01-05,1\n'.repeat(100_001);
    expect(Buffer.byteLength(many)).toBeLessThan(5 * 1024 * 1024);
    const m = await importCsv(outbreakId, many);
    expect(m.status).toBe(422);
    expect(m.body.error.message).toMatch(/100,000 rows/);
    expect(await liveCount(outbreakId)).toBe(before);
  });

  it('refuses a JSON body (415) and a field officer (403)', async () => {
    const j = await importCsv(outbreakId, '{"a":1}', { contentType: 'application/json' });
    expect(j.status).toBe(415);
    const f = await importCsv(outbreakId, fixture('tallies-clean.csv'), { cookie: fieldCookie });
    expect(f.status).toBe(403);
  });
});
