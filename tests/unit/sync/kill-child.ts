/**
 * A server process for the kill test (tests/integration/sync-faults.test.ts): opens the test's
 * SQLite file, pushes one big batch through the real pushMutations, and stops inside the batch's
 * transaction after `pauseAt` mutations are recorded, printing MID so the parent can kill -9 it.
 *
 *   tsx tests/unit/sync/kill-child.ts <sqlite file> <batch json file> <email> <pauseAt>
 */
import { readFileSync } from 'node:fs';

async function main() {
  const [file, batchFile, email, pauseAt] = process.argv.slice(2);
  process.env.DATABASE_URL = `file:${file}`;
  const { db } = await import('@/lib/db/connection');
  const { AppliedMutation, User } = await import('@/models');
  const { loadActor } = await import('@/lib/db/users');
  const { pushMutations } = await import('@/lib/db/sync');
  await db();
  const u = await User.findOne({ where: { email } });
  const actor = u && (await loadActor(u.id, u.sessionVersion));
  if (!actor) throw new Error(`no actor ${email}`);
  let recorded = 0;
  AppliedMutation.addHook('afterCreate', async () => {
    if (++recorded === Number(pauseAt)) {
      process.stdout.write(`MID ${recorded}\n`);
      // Hold the open transaction until the parent kills this process.
      await new Promise(() => undefined);
    }
  });
  const body = JSON.parse(readFileSync(batchFile!, 'utf8'));
  await pushMutations(actor, body);
  process.stdout.write('DONE\n');
}

main().catch((err) => {
  process.stderr.write(String(err?.stack ?? err));
  process.exit(2);
});
