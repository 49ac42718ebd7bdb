// `npm test`: types, then unit and integration tests (vitest), then end-to-end (Playwright).
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { root } from './env.mjs';

// With EBBCAST_TEST_PG (a PostgreSQL server URL; .ci/run sets it), the integration suite runs a
// second time against PostgreSQL.
const vitest = path.join(root, 'node_modules/vitest/vitest.mjs');
const { EBBCAST_TEST_PG, ...sqliteEnv } = process.env;
const steps = [
  ['typecheck', [path.join(root, 'node_modules/typescript/bin/tsc'), '--noEmit', '-p', 'tsconfig.json'], sqliteEnv],
  ['vitest (SQLite)', [vitest, 'run'], sqliteEnv],
  ...(EBBCAST_TEST_PG ? [['vitest integration (PostgreSQL)', [vitest, 'run', 'tests/integration'], process.env]] : []),
  ['e2e', [path.join(root, 'scripts/e2e.mjs')], sqliteEnv],
];
for (const [name, args, env] of steps) {
  console.log(`\n== ${name} ==`);
  const t0 = Date.now();
  const r = spawnSync(process.execPath, args, { cwd: root, stdio: 'inherit', env });
  console.log(`== ${name}: ${r.status === 0 ? 'ok' : 'FAILED'} in ${Math.round((Date.now() - t0) / 1000)} s ==`);
  if (r.status !== 0) process.exit(r.status ?? 1);
}
