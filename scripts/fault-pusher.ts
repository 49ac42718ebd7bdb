/**
 * A sync client in a process of its own, for the fault test (tests/integration/faults.test.ts):
 * it pushes the batches of a plan file through the server's push function (lib/db/sync.ts, the
 * same transaction the route runs), resuming after the last batch the server recorded, until
 * every batch is in. The test kills it with SIGKILL at random moments and starts it again.
 *
 *   DATABASE_URL=file:/tmp/x.sqlite npx tsx scripts/fault-pusher.ts <plan.json>
 *
 * Prints `ready` once connected, `pushed <batch>` after each batch commits, `done` at the end.
 */
import { readFileSync } from 'node:fs';
import type { PushBody } from '@/lib/validation/sync';

interface Plan {
  email: string;
  deviceId: string;
  batches: PushBody['mutations'][];
}

async function main() {
  const plan = JSON.parse(readFileSync(process.argv[2]!, 'utf8')) as Plan;
  const { db } = await import('@/lib/db/connection');
  const { loadActor } = await import('@/lib/db/users');
  const { pushMutations, registerDevice } = await import('@/lib/db/sync');
  const { Device, User } = await import('@/models');
  await db();
  const u = await User.findOne({ where: { email: plan.email } });
  if (!u) throw new Error(`no user ${plan.email}`);
  const actor = (await loadActor(u.id, u.sessionVersion))!;
  await registerDevice(actor, { id: plan.deviceId, label: 'Fault-test tablet' });
  process.stdout.write('ready\n');
  for (;;) {
    // The outbox's rule: resend from the first mutation the server has not recorded.
    const highest = Number((await Device.findByPk(plan.deviceId))!.highestSeq);
    const next = plan.batches.findIndex((b) => b.at(-1)!.seq > highest);
    if (next < 0) break;
    const res = await pushMutations(actor, { deviceId: plan.deviceId, mutations: plan.batches[next]! });
    if (res.results.length !== plan.batches[next]!.length) throw new Error('short answer');
    process.stdout.write(`pushed ${next}\n`);
  }
  process.stdout.write('done\n');
  process.exit(0);
}

main().catch((err) => {
  process.stderr.write(`${err instanceof Error ? err.stack : String(err)}\n`);
  process.exit(1);
});
