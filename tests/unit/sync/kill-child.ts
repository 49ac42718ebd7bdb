/**
 * A server process for the kill test (tests/integration/sync-faults.test.ts): opens the test's
 * SQLite file, pushes one big batch through the real pushMutations, and stops inside the batch's
 * transaction once at least `pauseAt` tallies of it are written (not yet committed), printing MID so
 * the parent can kill -9 it.
 *
 *   tsx tests/unit/sync/kill-child.ts <sqlite file> <batch json file> <email> <pauseAt>
 */
import { readFileSync } from 'node:fs';

async function main() {
  const [file, batchFile, email, pauseAt] = process.argv.slice(2);
  process.env.DATABASE_URL = `file:${file}`;
  const { db } = await import('@/lib/db/connection');
  const { User } = await import('@/models');
  const { loadActor } = await import('@/lib/db/users');
  const { pushMutations } = await import('@/lib/db/sync');
  await db();
  const u = await User.findOne({ where: { email } });
  const actor = u && (await loadActor(u.id, u.sessionVersion));
  if (!actor) throw new Error(`no actor ${email}`);
  let written = 0;
  const pause = async (n: number) => {
    written += n;
    if (written >= Number(pauseAt)) {
      process.stdout.write(`MID ${written}\n`);
      // Hold the open transaction until the parent kills this process.
      await new Promise(() => undefined);
    }
  };
  // Every INSERT of tally rows, whether one by one or in bulk (the query hook sees both).
  const sequelize = await db();
  sequelize.addHook('afterQuery', async (options: unknown, query: unknown) => {
    const sql = String((query as { sql?: string })?.sql ?? '');
    if (/^INSERT INTO `tallies`/.test(sql)) await pause(Math.max(1, (sql.match(/\),\(/g) ?? []).length + 1));
    void options;
  });
  const body = JSON.parse(readFileSync(batchFile!, 'utf8'));
  await pushMutations(actor, body);
  process.stdout.write('DONE\n');
}

main().catch((err) => {
  process.stderr.write(String(err?.stack ?? err));
  process.exit(2);
});
