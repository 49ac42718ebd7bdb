import { db } from './connection';
import { seedDemoIfEmpty } from './seed';
import { DEMO_PASSWORD, DEMO_USERS } from './demo';
import './demo-seeds';

/** Migrates and, unless `EBBCAST_SEED_DEMO=0`, seeds the demo once. Called when the server starts. */
export async function prepareDatabase({ quiet = false } = {}): Promise<void> {
  await db();
  if (process.env.EBBCAST_SEED_DEMO === '0') return;
  const seeded = await seedDemoIfEmpty();
  if (seeded && !quiet) {
    console.log('\nEbbcast demo seeded (Marrow Bend). Demo sign-ins, password "%s":', DEMO_PASSWORD);
    for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(12)} ${u.email}`);
    console.log('');
  }
}
