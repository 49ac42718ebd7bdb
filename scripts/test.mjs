// `npm test`: types, then unit and integration tests (vitest), then end-to-end (Playwright).
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { root } from './env.mjs';

const steps = [
  ['typecheck', [path.join(root, 'node_modules/typescript/bin/tsc'), '--noEmit', '-p', 'tsconfig.json']],
  ['vitest', [path.join(root, 'node_modules/vitest/vitest.mjs'), 'run']],
  ['e2e', [path.join(root, 'scripts/e2e.mjs')]],
];
for (const [name, args] of steps) {
  console.log(`\n== ${name} ==`);
  const t0 = Date.now();
  const r = spawnSync(process.execPath, args, { cwd: root, stdio: 'inherit', env: process.env });
  console.log(`== ${name}: ${r.status === 0 ? 'ok' : 'FAILED'} in ${Math.round((Date.now() - t0) / 1000)} s ==`);
  if (r.status !== 0) process.exit(r.status ?? 1);
}
