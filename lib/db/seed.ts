import { randomUUID } from 'node:crypto';
import { Outbreak, OutbreakMember, Site, Team, TeamMembership, User } from '@/models';
import { writeTx, db } from './connection';
import { nextChangeSeq } from './counters';
import { hashPassword } from './users';
import { DEMO_IDS, DEMO_PASSWORD, DEMO_SITES, DEMO_USERS, demoStartDate } from './demo';

type SeedHook = (ctx: { transaction: import('sequelize').Transaction; startDate: string; userIds: Record<string, string> }) => Promise<void>;

/**
 * Later parts of the demo (tallies, scenarios) register here so that one seed writes them all in
 * the same transaction as the outbreak.
 */
const hooks: SeedHook[] = [];
export function addDemoSeedHook(hook: SeedHook): void {
  hooks.push(hook);
}

/** Seeds the Marrow Bend demo once: does nothing when any user exists. Returns whether it seeded. */
export async function seedDemoIfEmpty(): Promise<boolean> {
  await db();
  if ((await User.count()) > 0) return false;
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const startDate = demoStartDate();
  await writeTx(async (t) => {
    if ((await User.count({ transaction: t })) > 0) return;
    const stamp = async () => ({ version: 1, changeSeq: await nextChangeSeq(t), updatedBy: null, deviceId: null });
    await Outbreak.create(
      { id: DEMO_IDS.outbreak, name: 'Marrow Bend ILI', disease: 'Influenza-like illness', area: 'Marrow Bend district',
        population: 12660, startDate, beds: 40, ...(await stamp()) },
      { transaction: t },
    );
    await Team.create({ id: DEMO_IDS.teamNorth, outbreakId: DEMO_IDS.outbreak, name: 'North team', ...(await stamp()) }, { transaction: t });
    await Team.create({ id: DEMO_IDS.teamLakeshore, outbreakId: DEMO_IDS.outbreak, name: 'Lakeshore team', ...(await stamp()) }, { transaction: t });
    for (const s of DEMO_SITES) {
      await Site.create(
        { id: DEMO_IDS[s.key], outbreakId: DEMO_IDS.outbreak, teamId: DEMO_IDS[s.team], name: s.name, kind: s.kind,
          population: s.population, ...(await stamp()) },
        { transaction: t },
      );
    }
    const userIds: Record<string, string> = {};
    for (const u of DEMO_USERS) {
      const id = randomUUID();
      userIds[u.email] = id;
      await User.create({ id, email: u.email, name: u.name, role: u.role, passwordHash, active: true }, { transaction: t });
      for (const team of u.teams) await TeamMembership.create({ id: randomUUID(), teamId: DEMO_IDS[team], userId: id }, { transaction: t });
      if (u.role === 'coordinator' || u.role === 'supervisor') {
        await OutbreakMember.create({ id: randomUUID(), outbreakId: DEMO_IDS.outbreak, userId: id }, { transaction: t });
      }
    }
    for (const hook of hooks) await hook({ transaction: t, startDate, userIds });
  });
  return true;
}
