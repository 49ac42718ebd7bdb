/**
 * Tally benchmarks (npm run bench -- tallies), on a scratch SQLite file:
 *   1. the epi curve query (lib/db/curve.ts getEpiCurve) of an outbreak with 500 sites × 365 days
 *      (≈ 180,000 live tallies after 2 % gaps), whole outbreak and one site: median of 20 after warm-up;
 *   2. a 10,000-row CSV import through importTalliesCsv (parse, check, one transaction), into an
 *      outbreak of 50 sites in the same database: median of 3, each into a fresh outbreak.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { BenchRow } from './types';
import { seedOutbreak, seedScale } from './tallies-seed';
import { addDays } from '../lib/tallies/dates';

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : 0.5 * (s[m - 1]! + s[m]!);
}

async function timeIt(fn: () => Promise<unknown>, repeats: number, warm = 3): Promise<number> {
  for (let i = 0; i < warm; i++) await fn();
  const xs: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    await fn();
    xs.push(performance.now() - t0);
  }
  return median(xs);
}

export default async function tallies(): Promise<BenchRow[]> {
  const dir = mkdtempSync(path.join(tmpdir(), 'ebbcast-bench-tallies-'));
  const previous = process.env.DATABASE_URL;
  process.env.DATABASE_URL = `file:${path.join(dir, 'bench.sqlite')}`;
  const { closeDb } = await import('../lib/db/connection');
  await closeDb();
  try {
    const t0 = performance.now();
    const seed = await seedScale({ sites: 500, days: 365 });
    const seedMs = performance.now() - t0;
    const { getEpiCurve } = await import('../lib/db/curve');
    const { importTalliesCsv } = await import('../lib/db/tallies');

    const curve = await getEpiCurve(seed.actor, seed.outbreakId);
    const sum = curve.days.reduce((a, d) => a + d.reportingSites, 0);
    if (sum !== seed.rows) throw new Error(`curve counts ${sum} tallies, seeded ${seed.rows}`);
    const curveMs = await timeIt(() => getEpiCurve(seed.actor, seed.outbreakId), 20);
    const siteMs = await timeIt(() => getEpiCurve(seed.actor, seed.outbreakId, { siteId: seed.siteIds[17] }), 20);

    // 10,000 rows: 50 sites × 200 days.
    const importMs: number[] = [];
    for (let r = 0; r < 3; r++) {
      const start = addDays(seed.startDate, 100);
      const o = await seedOutbreak(seed.actor, { sites: 50, startDate: start, name: `Import ${r}` });
      const lines = ['site,date,newCases,recoveries,deaths,admissions,note'];
      for (let d = 0; d < 200; d++) for (const name of o.siteNames) lines.push(`${name},${addDays(start, d)},${(d * 7 + name.length) % 23},,,,`);
      const text = lines.join('\n') + '\n';
      const t1 = performance.now();
      const report = await importTalliesCsv(seed.actor, o.outbreakId, text, { commit: true });
      importMs.push(performance.now() - t1);
      if (report.imported !== 10_000) throw new Error(`imported ${report.imported} of 10,000 (${report.issuesTotal} issues)`);
    }
    return [
      { name: 'tallies: seed 500 sites × 365 days', value: seedMs, unit: 'ms' },
      { name: 'tallies: rows seeded', value: seed.rows, unit: 'rows', target: '≈200,000' },
      { name: 'tallies: epi curve, whole outbreak', value: curveMs, unit: 'ms', target: '≤ 100 ms' },
      { name: 'tallies: epi curve, one site', value: siteMs, unit: 'ms', target: '≤ 100 ms' },
      { name: 'tallies: import 10,000-row CSV (commit)', value: median(importMs), unit: 'ms', target: '≤ 3000 ms' },
    ];
  } finally {
    await closeDb();
    if (previous === undefined) delete process.env.DATABASE_URL;
    else process.env.DATABASE_URL = previous;
    rmSync(dir, { recursive: true, force: true });
  }
}
