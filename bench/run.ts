/**
 * Runs every `bench/*.bench.ts` module in one process, prints one table and writes
 * `bench/results.json` as `{ name, value, unit }` rows. Ratios are measured in the same run,
 * so they survive a noisy shared machine better than absolute times.
 *
 *   npm run bench            all benchmarks
 *   npm run bench -- engine  only modules whose file name contains "engine"
 */
import { readdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Bench, BenchRow } from './types';

async function main() {
  const dir = path.dirname(new URL(import.meta.url).pathname);
  const filter = process.argv[2];
  const files = readdirSync(dir)
    .filter((f) => f.endsWith('.bench.ts'))
    .filter((f) => !filter || f.includes(filter))
    .sort();
  const rows: BenchRow[] = [];
  for (const file of files) {
    process.stderr.write(`bench: ${file}\n`);
    const mod = (await import(pathToFileURL(path.join(dir, file)).href)) as { default: Bench };
    rows.push(...(await mod.default()));
  }
  const w = Math.max(4, ...rows.map((r) => r.name.length));
  const line = (a: string, b: string, c: string, d: string) =>
    `${a.padEnd(w)}  ${b.padStart(12)}  ${c.padEnd(8)}  ${d}`;
  console.log(line('name', 'value', 'unit', 'target'));
  console.log('-'.repeat(w + 40));
  for (const r of rows) {
    const v = Math.abs(r.value) >= 100 ? r.value.toFixed(1) : r.value.toPrecision(4);
    console.log(line(r.name, v, r.unit, r.target ?? ''));
  }
  const out = path.join(dir, filter ? 'results.local.json' : 'results.json');
  writeFileSync(out, JSON.stringify(rows.map(({ name, value, unit }) => ({ name, value, unit })), null, 2) + '\n');
  console.log(`\nwritten ${path.relative(process.cwd(), out)}`);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
