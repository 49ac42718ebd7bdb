/**
 * The role × route matrix (issue 8): every app/api/**\/route.ts and every method it exports ×
 * signed out, a field officer of the North team (field), of the Lakeshore team (field2), the
 * demo coordinator, supervisor and admin, and a coordinator of another outbreak (outsider).
 * One valid request per route and method (route-matrix.fixtures.ts); the expected outcome per
 * actor comes from the permission table (lib/auth/roles.ts) [cp].
 *
 * Checks: signed out 401 and only the error; wrong role or scope 403, only the error, and no row
 * written anywhere; allowed 2xx, with no other team's sites or other outbreak's ids in it.
 */
import { TEST_DIR, USING_POSTGRES, call, prepare, sessionCookie } from '../helpers/server';
import { readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import { ACTORS, FIXTURES, NORTH_SITES, PNG_BYTES, countRows, diffCounts, scenarioInput, type ActorName, type Fixture, type MatrixCtx } from './route-matrix.fixtures';


const API = path.join(process.cwd(), 'app/api');
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;
const LAKESHORE_SITES = [DEMO_IDS.lakeshoreWard, DEMO_IDS.fennelVillage];

/** Every route folder under app/api (e.g. `outbreaks/[id]/sites`) and the methods its route.ts exports. */
async function routeTable(): Promise<{ dir: string; file: string; methods: string[] }[]> {
  const out: { dir: string; file: string; methods: string[] }[] = [];
  const walk = async (dir: string) => {
    for (const name of readdirSync(dir).sort()) {
      const p = path.join(dir, name);
      if (statSync(p).isDirectory()) await walk(p);
      else if (name === 'route.ts') {
        const mod = (await import(p)) as Record<string, unknown>;
        const methods = METHODS.filter((m) => typeof mod[m] === 'function');
        out.push({ dir: path.relative(API, path.dirname(p)).split(path.sep).join('/'), file: p, methods });
      }
    }
  };
  await walk(API);
  return out;
}

/** Files that declare server actions ('use server' as a directive), under app, components and lib. */
function serverActionFiles(): string[] {
  const hits: string[] = [];
  const walk = (dir: string) => {
    for (const entry of readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, entry.name);
      if (entry.isDirectory()) {
        if (entry.name !== 'node_modules' && !entry.name.startsWith('.')) walk(p);
      } else if (/\.(ts|tsx)$/.test(entry.name) && /^\s*['"]use server['"]/m.test(readFileSync(p, 'utf8'))) {
        hits.push(path.relative(process.cwd(), p));
      }
    }
  };
  for (const d of ['app', 'components', 'lib']) walk(path.join(process.cwd(), d));
  return hits;
}

const cookies = {} as Record<ActorName, string | undefined>;
let coordinatorActor: import('@/lib/auth/actor').Actor;
let adminActor: import('@/lib/auth/actor').Actor;
const TODAY = new Date().toISOString().slice(0, 10);
let catcher: { close(): Promise<void>; dir: string } | null = null;
const devices = new Map<ActorName, string>();
let counter = 0;

async function actorOf(email: string) {
  const { User } = await import('@/models');
  const { loadActor } = await import('@/lib/db/users');
  const u = (await User.findOne({ where: { email } }))!;
  return (await loadActor(u.id, u.sessionVersion))!;
}

async function freshUser(active: boolean): Promise<string> {
  const { createUser, updateUser } = await import('@/lib/db/users');
  const u = await createUser({ email: `matrix-${randomUUID().slice(0, 8)}@marrowbend.example`, name: 'Matrix person', role: 'field', teamIds: [DEMO_IDS.teamNorth], outbreakIds: [] });
  if (!active) await updateUser(u.id, { active: false });
  return u.id;
}

async function token(kind: 'invite' | 'reset'): Promise<string> {
  const { writeTx } = await import('@/lib/db/connection');
  const { issueToken } = await import('@/lib/db/mail-tokens');
  const { User } = await import('@/models');
  const userId = await freshUser(kind === 'reset');
  if (kind === 'invite') await User.update({ passwordHash: null, active: false }, { where: { id: userId } });
  return (await writeTx((t) => issueToken(t, kind, userId, null))).token;
}

function ctxFor(actor: ActorName): MatrixCtx {
  return {
    actor,
    n: ++counter,
    newScenario: async () => {
      const { upsertScenario } = await import('@/lib/db/scenarios');
      const s = await upsertScenario(coordinatorActor, { id: randomUUID(), outbreakId: DEMO_IDS.outbreak, name: `Matrix base ${counter}`, input: scenarioInput() as never }, { deviceId: null });
      return s.id;
    },
    newUser: () => freshUser(true),
    device: async () => {
      const id = devices.get(actor);
      if (!id) return { deviceId: randomUUID(), nextSeq: 1 };
      const { Device } = await import('@/models');
      return { deviceId: id, nextSeq: Number((await Device.findByPk(id))!.highestSeq) + 1 };
    },
    inviteToken: () => token('invite'),
    resetToken: () => token('reset'),
    mailId: async () => {
      const { listCaughtMail } = await import('@/lib/mail/mailbox');
      for (let i = 0; i < 100; i++) {
        const m = listCaughtMail({ limit: 1 })[0];
        if (m) return m.id;
        await new Promise((r) => setTimeout(r, 50));
      }
      throw new Error('the mail catcher kept no message');
    },
    newSite: async (team = 'north') => {
      const { createSite } = await import('@/lib/db/outbreaks');
      const teamId = team === 'north' ? DEMO_IDS.teamNorth : DEMO_IDS.teamLakeshore;
      return (await createSite(coordinatorActor, { outbreakId: DEMO_IDS.outbreak, teamId, name: `Matrix site ${randomUUID().slice(0, 8)}`, kind: 'camp', population: 500 })).id;
    },
    newTally: async () => {
      const { createSite } = await import('@/lib/db/outbreaks');
      const { upsertTally } = await import('@/lib/db/tallies');
      const site = await createSite(coordinatorActor, { outbreakId: DEMO_IDS.outbreak, teamId: DEMO_IDS.teamNorth, name: `Matrix site ${randomUUID().slice(0, 8)}`, kind: 'camp', population: 500 });
      const r = await upsertTally(coordinatorActor, { id: randomUUID(), siteId: site.id, date: TODAY, newCases: 1 }, { deviceId: null });
      return { id: r.tally!.id, siteId: site.id, date: TODAY, version: r.tally!.version };
    },
    newConflict: async () => {
      const { createSite } = await import('@/lib/db/outbreaks');
      const { upsertTally } = await import('@/lib/db/tallies');
      const site = await createSite(coordinatorActor, { outbreakId: DEMO_IDS.outbreak, teamId: DEMO_IDS.teamNorth, name: `Matrix site ${randomUUID().slice(0, 8)}`, kind: 'camp', population: 500 });
      await upsertTally(coordinatorActor, { id: randomUUID(), siteId: site.id, date: TODAY, newCases: 1 }, { deviceId: null });
      const r = await upsertTally(coordinatorActor, { id: randomUUID(), siteId: site.id, date: TODAY, newCases: 2 }, { deviceId: null });
      if (r.status !== 'conflict' || !r.conflict) throw new Error('expected a duplicate-day conflict');
      return { id: r.conflict.id, version: r.conflict.version, currentVersion: r.tally!.version };
    },
    newSheet: async () => {
      const { createSite } = await import('@/lib/db/outbreaks');
      const { saveTallySheet } = await import('@/lib/db/uploads');
      const site = await createSite(coordinatorActor, { outbreakId: DEMO_IDS.outbreak, teamId: DEMO_IDS.teamNorth, name: `Matrix site ${randomUUID().slice(0, 8)}`, kind: 'camp', population: 500 });
      const r = (await saveTallySheet(coordinatorActor, { clientId: randomUUID(), siteId: site.id, date: TODAY }, { name: 'sheet.png', bytes: PNG_BYTES })) as { sheet: { id: string } };
      return { id: r.sheet.id, siteId: site.id };
    },
    today: TODAY,
    state: {},
  };
}

beforeAll(async () => {
  const { startCatcher } = (await import('../../scripts/mail-catcher.mjs')) as typeof import('../../scripts/mail-catcher.mjs');
  const c = await startCatcher({ dir: path.join(TEST_DIR, 'mail'), quiet: true });
  catcher = c;
  process.env.SMTP_URL = c.url;
  process.env.MAIL_CATCHER_DIR = c.dir;
  await prepare();
  for (const a of ['field', 'field2', 'coordinator', 'supervisor', 'admin'] as const) cookies[a] = await sessionCookie(`${a}@marrowbend.example`);
  coordinatorActor = await actorOf('coordinator@marrowbend.example');
  adminActor = await actorOf('admin@marrowbend.example');
  // The outsider: a coordinator responsible only for an outbreak of their own.
  const { createUser } = await import('@/lib/db/users');
  const { createOutbreak } = await import('@/lib/db/outbreaks');
  await createUser({ email: 'outsider@elsewhere.example', name: 'Outsider', role: 'coordinator', teamIds: [], outbreakIds: [] });
  await createOutbreak(await actorOf('outsider@elsewhere.example'), { name: 'Elsewhere', disease: 'ILI', area: 'Far', population: 5000, startDate: '2026-01-01' });
  cookies.outsider = await sessionCookie('outsider@elsewhere.example');
  // A device per actor that may register one (sync:pull).
  const { registerDevice } = await import('@/lib/db/sync');
  for (const a of ['field', 'field2', 'coordinator', 'supervisor', 'outsider'] as const) {
    const d = await registerDevice(await actorOf(a === 'outsider' ? 'outsider@elsewhere.example' : `${a}@marrowbend.example`), { id: randomUUID(), label: `${a} tablet` });
    devices.set(a, d.id);
  }
  // One caught message for GET /api/mail/[id].
  const { sendInvitation } = await import('@/lib/db/invitations');
  await sendInvitation(adminActor, { email: 'matrix-first@marrowbend.example', name: 'First', role: 'field', teamIds: [DEMO_IDS.teamLakeshore], outbreakIds: [] });
});

afterAll(async () => {
  await catcher?.close();
});

describe('role × route matrix', () => {
  it('has a fixture for every route file and method, and no fixture without a route', async () => {
    const table = await routeTable();
    const keys = table.flatMap((r) => r.methods.map((m) => `${m} ${r.dir}`));
    const missing = keys.filter((k) => !(k in FIXTURES));
    const stale = Object.keys(FIXTURES).filter((k) => !keys.includes(k));
    expect(missing, 'route methods without a row in route-matrix.fixtures.ts').toEqual([]);
    expect(stale, 'fixture rows whose route or method no longer exists').toEqual([]);
    expect(table.length).toBeGreaterThanOrEqual(20);
  });

  it('has no server actions, or a row for each', () => {
    const files = serverActionFiles();
    console.log(files.length ? `server actions in: ${files.join(', ')}` : "server actions: none ('use server' appears in no file under app, components, lib)");
    // A server action bypasses route(): it must get matrix rows before it lands.
    expect(files, 'server actions need rows in the matrix').toEqual([]);
  });

  it('answers every actor as the permission table says', async () => {
    const table = await routeTable();
    const failures: string[] = [];
    const tally = { ok: 0, deny: 0, unauth: 0, reject: 0 };
    const outOfProcess: string[] = [];
    let cells = 0;
    for (const r of table) {
      const mod = (await import(r.file)) as Record<string, unknown>;
      for (const method of r.methods) {
        const key = `${method} ${r.dir}`;
        const fx = FIXTURES[key] as Fixture | undefined;
        if (!fx) continue; // reported by the coverage test above
        if (fx.outOfProcess) {
          outOfProcess.push(`${key}: ${fx.outOfProcess}`);
          continue;
        }
        for (const actor of ACTORS) {
          cells++;
          const want = fx.expect[actor];
          const ctx = ctxFor(actor);
          const params = (await fx.params?.(ctx)) ?? {};
          const query = (await fx.query?.(ctx)) ?? '';
          const url = (fx.path ?? '/api/' + r.dir.replace(/\[(\.\.\.)?(\w+)\]/g, (_, __, name: string) => String(params[name]))) + (query ? `?${query}` : '');
          // Every row the fixture needs is made before counting, so the count sees only the request's writes.
          const raw = fx.raw ? await fx.raw(ctx) : undefined;
          const body = !raw && fx.body ? await fx.body(ctx) : undefined;
          const before = want === 'ok' ? null : await countRows();
          const res = raw
            ? await call(mod[method] as never, url, { method, params: params as never, rawBody: raw.body, contentType: raw.contentType, cookie: cookies[actor] })
            : await call(mod[method] as never, url, { method, params: params as never, body, cookie: cookies[actor] });
          const where = `${key} as ${actor} (want ${want}, got ${res.status} ${JSON.stringify(res.body).slice(0, 200)})`;
          const onlyError = res.body && typeof res.body === 'object' && Object.keys(res.body).join() === 'error';
          if (want === 'ok') {
            const good = (res.status >= 200 && res.status < 300) || fx.okStatus?.includes(res.status);
            if (!good) failures.push(where);
            const text = JSON.stringify(res.body);
            const hidden: Record<string, string[]> = {
              field: [...LAKESHORE_SITES, 'Lakeshore Ward', 'Fennel Village'],
              field2: [...NORTH_SITES, 'Alder Camp', 'Northgate School', 'Hollin Crossing'],
              outsider: [DEMO_IDS.outbreak, DEMO_IDS.teamNorth, DEMO_IDS.teamLakeshore, ...NORTH_SITES, ...LAKESHORE_SITES, 'Marrow Bend', 'Alder Camp', 'Lakeshore Ward'],
            };
            const allowed = new Set(fx.mayShow?.[actor]?.ids ?? []);
            for (const id of hidden[actor] ?? []) if (!allowed.has(id) && text.includes(id)) failures.push(`${where}: shows ${id}`);
          } else if (want === 'deny' || want === 'unauth') {
            const status = want === 'deny' ? 403 : 401;
            const code = want === 'deny' ? 'forbidden' : 'unauthenticated';
            if (res.status !== status || res.body?.error?.code !== code || !onlyError) failures.push(where);
            const changed = diffCounts(before!, await countRows());
            if (changed.length) failures.push(`${where}: wrote ${changed.join(', ')}`);
          } else {
            const results = (res.body?.results ?? []) as Array<{ fate: string; record?: unknown }>;
            if (res.status !== 200 || !results.length || results.some((x) => x.fate !== 'rejected' || x.record)) failures.push(where);
            const changed = diffCounts(before!, await countRows()).filter((t) => /^(tallies|conflicts|scenarios)\b/.test(t));
            if (changed.length) failures.push(`${where}: wrote ${changed.join(', ')}`);
          }
          tally[want]++;
        }
      }
    }
    const methods = table.reduce((s, r) => s + r.methods.length, 0);
    console.log(
      `role × route matrix (${USING_POSTGRES ? 'PostgreSQL' : 'SQLite'}): ${table.length} route files, ${methods} route methods × ${ACTORS.length} actors = ${cells} cells ` +
        `(${tally.ok} allowed, ${tally.deny} refused 403, ${tally.unauth} refused 401, ${tally.reject} rejected per mutation)`,
    );
    for (const o of outOfProcess) console.log(`  not called here: ${o}`);
    expect(failures).toEqual([]);
    expect(cells).toBe((methods - outOfProcess.length) * ACTORS.length);
  }, 600_000);

  it("shows a field officer only their own devices", async () => {
    const { GET } = await import('@/app/api/devices/route');
    const mine = await call(GET as never, '/api/devices', { cookie: cookies.field });
    const { User } = await import('@/models');
    const me = (await User.findOne({ where: { email: 'field@marrowbend.example' } }))!;
    expect(mine.body.devices.length).toBeGreaterThan(0);
    expect(mine.body.devices.every((d: { userId: string }) => d.userId === me.id)).toBe(true);
  });
});
