// `npm test`: types, then unit and integration tests (vitest), then end-to-end (Playwright).
// Each runner also writes a JSON report; the last line adds them up as
// "N passed, N failed, N skipped", alone on its line: the plain closing line CI reads (vitest's and
// Playwright's own summaries are not among the formats it knows).
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { root } from './env.mjs';

// With EBBCAST_TEST_PG (a PostgreSQL server URL; .ci/run sets it), the integration suite runs a
// second time against PostgreSQL.
const vitest = path.join(root, 'node_modules/vitest/vitest.mjs');
const reports = mkdtempSync(path.join(tmpdir(), 'ebbcast-test-'));
const report = (name) => path.join(reports, `${name}.json`);
const vitestArgs = (name, ...rest) => [vitest, 'run', ...rest, '--reporter=default', '--reporter=json', `--outputFile.json=${report(name)}`];
const { EBBCAST_TEST_PG, ...sqliteEnv } = process.env;
const steps = [
  ['typecheck', [path.join(root, 'node_modules/typescript/bin/tsc'), '--noEmit', '-p', 'tsconfig.json'], sqliteEnv],
  ['vitest (SQLite)', vitestArgs('vitest-sqlite'), sqliteEnv, 'vitest-sqlite'],
  ...(EBBCAST_TEST_PG ? [['vitest integration (PostgreSQL)', vitestArgs('vitest-pg', 'tests/integration'), process.env, 'vitest-pg']] : []),
  ['e2e', [path.join(root, 'scripts/e2e.mjs')], { ...sqliteEnv, PLAYWRIGHT_JSON_REPORT: report('e2e') }, 'e2e'],
];

/** Passed, failed and skipped tests of one runner's JSON report (vitest's or Playwright's). */
function count(name) {
  if (!existsSync(report(name))) return null;
  const r = JSON.parse(readFileSync(report(name), 'utf8'));
  if (r.stats && 'expected' in r.stats) {
    // Playwright: "expected" includes tests marked test.fail that failed as declared.
    return { passed: r.stats.expected + r.stats.flaky, failed: r.stats.unexpected, skipped: r.stats.skipped, flaky: r.stats.flaky };
  }
  return { passed: r.numPassedTests, failed: r.numFailedTests, skipped: (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0) };
}

const total = { passed: 0, failed: 0, skipped: 0 };
function summary() {
  console.log(`${total.passed} passed, ${total.failed} failed, ${total.skipped} skipped`);
}

for (const [name, args, env, reportName] of steps) {
  console.log(`\n== ${name} ==`);
  const t0 = Date.now();
  const r = spawnSync(process.execPath, args, { cwd: root, stdio: 'inherit', env });
  const c = reportName ? count(reportName) : null;
  if (c) for (const k of Object.keys(total)) total[k] += c[k];
  // "flaky": passed only when retried (Playwright retries once under CI).
  const counts = c ? ` (${c.passed} passed, ${c.failed} failed, ${c.skipped} skipped${c.flaky ? `, of the passed ${c.flaky} flaky` : ''})` : '';
  console.log(`== ${name}: ${r.status === 0 ? 'ok' : 'FAILED'} in ${Math.round((Date.now() - t0) / 1000)} s${counts} ==`);
  if (r.status !== 0) {
    if (!c) total.failed += 1; // a step that failed without a report (types, a build) counts as one failure
    summary();
    process.exit(r.status ?? 1);
  }
}
summary();
