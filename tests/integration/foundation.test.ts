import { TEST_DIR, USING_POSTGRES, call, prepare, sessionCookie } from '../helpers/server';
import { readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';
import { QueryTypes } from 'sequelize';

const API = path.join(process.cwd(), 'app/api');
const UUID = '00000000-0000-4000-8000-0000000000ff';
const METHODS = ['GET', 'POST', 'PUT', 'PATCH', 'DELETE'] as const;

/** Every app/api/**\/route.ts with its URL (dynamic segments filled with a UUID). */
function routeFiles(dir = API): { file: string; url: string }[] {
  const out: { file: string; url: string }[] = [];
  for (const name of readdirSync(dir)) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) out.push(...routeFiles(p));
    else if (name === 'route.ts') {
      const rel = path.relative(API, path.dirname(p)).split(path.sep).filter(Boolean);
      const url = '/api/' + rel.map((s) => (s.startsWith('[') ? (s.startsWith('[...') ? 'x' : UUID) : s)).join('/');
      out.push({ file: p, url });
    }
  }
  return out;
}

let field: string, field2: string, coordinator: string, supervisor: string, admin: string;

beforeAll(async () => {
  await prepare();
  const c = await Promise.all(['field', 'field2', 'coordinator', 'supervisor', 'admin'].map((u) => sessionCookie(`${u}@marrowbend.example`)));
  [field, field2, coordinator, supervisor, admin] = c as [string, string, string, string, string];
});

describe('database', () => {
  it.skipIf(USING_POSTGRES)('is a real SQLite file in WAL mode with foreign keys on', async () => {
    const { db } = await import('@/lib/db/connection');
    const s = await db();
    const [mode] = await s.query<{ journal_mode: string }>('PRAGMA journal_mode', { type: QueryTypes.SELECT });
    expect(mode!.journal_mode).toBe('wal');
    const [fk] = await s.query<{ foreign_keys: number }>('PRAGMA foreign_keys', { type: QueryTypes.SELECT });
    expect(fk!.foreign_keys).toBe(1);
    expect(statSync(path.join(TEST_DIR, 'test.sqlite')).size).toBeGreaterThan(0);
  });

  it('was migrated (not synced) and seeded once with the demo', async () => {
    const { db } = await import('@/lib/db/connection');
    const s = await db();
    const [rows] = (await s.query('SELECT name FROM schema_migrations')) as [Array<{ name: string }>, unknown];
    expect(rows.map((r) => r.name)).toContain('0001-foundation');
    const { seedDemoIfEmpty } = await import('@/lib/db/seed');
    expect(await seedDemoIfEmpty()).toBe(false);
    const { User, Site } = await import('@/models');
    expect(await User.count()).toBe(5);
    expect(await Site.count({ where: { outbreakId: DEMO_IDS.outbreak } })).toBeGreaterThanOrEqual(4);
  });

  it('keeps 20 concurrent writes through the data layer (the write lock holds)', async () => {
    const { createSite } = await import('@/lib/db/outbreaks');
    const { loadActor } = await import('@/lib/db/users');
    const { User, Site } = await import('@/models');
    const u = (await User.findOne({ where: { email: 'coordinator@marrowbend.example' } }))!;
    const actor = (await loadActor(u.id, u.sessionVersion))!;
    const before = await Site.count();
    const results = await Promise.allSettled(
      Array.from({ length: 20 }, (_, i) => createSite(actor, { outbreakId: DEMO_IDS.outbreak, name: `Concurrent ${i}`, kind: 'other', population: 100 + i })),
    );
    const failed = results.filter((r) => r.status === 'rejected');
    expect(failed).toEqual([]);
    expect(await Site.count()).toBe(before + 20);
    // Each write got its own change counter value.
    const seqs = (await Site.findAll({ where: { name: Array.from({ length: 20 }, (_, i) => `Concurrent ${i}`) } })).map((s) => Number(s.changeSeq));
    expect(new Set(seqs).size).toBe(20);
  });
});

describe('API convention', () => {
  const routes = routeFiles();

  it('finds the route files', () => {
    expect(routes.length).toBeGreaterThanOrEqual(8);
  });

  it('answers 401 with the error shape to a signed-out request on every route and method (except health and auth)', async () => {
    let checked = 0;
    for (const r of routes) {
      if (r.url === '/api/health' || r.url.startsWith('/api/auth/')) continue;
      const mod = (await import(r.file)) as Record<string, unknown>;
      for (const m of METHODS) {
        const handler = mod[m];
        if (typeof handler !== 'function') continue;
        const res = await call(handler as never, r.url, { method: m, body: m === 'GET' ? undefined : {} });
        expect(res.status, `${m} ${r.url}`).toBe(401);
        expect(res.body.error.code).toBe('unauthenticated');
        checked++;
      }
    }
    expect(checked).toBeGreaterThanOrEqual(8);
  });

  it('answers health without sign-in', async () => {
    const { GET } = await import('@/app/api/health/route');
    const res = await call(GET as never, '/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ ok: true, database: USING_POSTGRES ? 'postgres' : 'sqlite' });
  });

  it('refuses a wrong role with 403 and no data', async () => {
    const { GET, POST } = await import('@/app/api/users/route');
    const list = await call(GET as never, '/api/users', { cookie: field });
    expect(list.status).toBe(403);
    expect(list.body.users).toBeUndefined();
    const create = await call(POST as never, '/api/users', { method: 'POST', cookie: coordinator, body: { email: 'x@y.example', name: 'X', role: 'field' } });
    expect(create.status).toBe(403);
    const ok = await call(GET as never, '/api/users', { cookie: admin });
    expect(ok.status).toBe(200);
    expect(ok.body.users.length).toBe(5);
  });

  it("refuses another team's or outbreak's data with 403", async () => {
    const { POST } = await import('@/app/api/outbreaks/route');
    // A second coordinator's outbreak: Mira (the demo coordinator) is not responsible for it.
    const { createUser } = await import('@/lib/db/users');
    await createUser({ email: 'other.coord@elsewhere.example', name: 'Other', role: 'coordinator', teamIds: [], outbreakIds: [] });
    const other = await sessionCookie('other.coord@elsewhere.example');
    const created = await call(POST as never, '/api/outbreaks', {
      method: 'POST', cookie: other,
      body: { name: 'Elsewhere measles', disease: 'Measles', area: 'Elsewhere', population: 5000, startDate: '2026-10-01' },
    });
    expect(created.status).toBe(200);
    const id = created.body.outbreak.id as string;
    const one = await import('@/app/api/outbreaks/[id]/route');
    for (const cookie of [field, coordinator, supervisor]) {
      const res = await call(one.GET as never, `/api/outbreaks/${id}`, { cookie, params: { id } });
      expect(res.status).toBe(403);
      expect(res.body.outbreak).toBeUndefined();
    }
    expect((await call(one.GET as never, `/api/outbreaks/${id}`, { cookie: other, params: { id } })).status).toBe(200);
    // A field officer sees only their own team's sites of the demo outbreak.
    const sites = await import('@/app/api/outbreaks/[id]/sites/route');
    const mine = await call(sites.GET as never, `/api/outbreaks/${DEMO_IDS.outbreak}/sites`, { cookie: field, params: { id: DEMO_IDS.outbreak } });
    const theirs = await call(sites.GET as never, `/api/outbreaks/${DEMO_IDS.outbreak}/sites`, { cookie: field2, params: { id: DEMO_IDS.outbreak } });
    const names = (r: typeof mine) => (r.body.sites as Array<{ name: string }>).map((s) => s.name);
    expect(names(mine)).toContain('Alder Camp');
    expect(names(mine)).not.toContain('Lakeshore Ward');
    expect(names(theirs)).toContain('Lakeshore Ward');
    expect(names(theirs)).not.toContain('Alder Camp');
    // Field officers may not create sites.
    const add = await call(sites.POST as never, `/api/outbreaks/${DEMO_IDS.outbreak}/sites`, {
      method: 'POST', cookie: field, params: { id: DEMO_IDS.outbreak }, body: { name: 'New', kind: 'camp', population: 10 },
    });
    expect(add.status).toBe(403);
  });

  it('answers 400 with zod field paths for invalid fields', async () => {
    const { POST } = await import('@/app/api/outbreaks/route');
    const res = await call(POST as never, '/api/outbreaks', {
      method: 'POST', cookie: coordinator,
      body: { name: '', disease: 'Measles', area: 'A', population: -5, startDate: '2026-02-30', extra: 1 },
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(Object.keys(res.body.error.fields)).toEqual(expect.arrayContaining(['name', 'population', 'startDate']));
  });

  it('answers 400 for malformed JSON, 415 for a wrong content type, 413 for a body over 1 MiB', async () => {
    const { POST } = await import('@/app/api/outbreaks/route');
    const bad = await call(POST as never, '/api/outbreaks', { method: 'POST', cookie: coordinator, rawBody: '{"name": ', contentType: 'application/json' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.code).toBe('invalid_json');
    const text = await call(POST as never, '/api/outbreaks', { method: 'POST', cookie: coordinator, rawBody: '{}', contentType: 'text/plain' });
    expect(text.status).toBe(415);
    expect(text.body.error.code).toBe('unsupported_media_type');
    const big = JSON.stringify({ name: 'x'.repeat(1024 * 1024 + 10) });
    const large = await call(POST as never, '/api/outbreaks', { method: 'POST', cookie: coordinator, rawBody: big, contentType: 'application/json' });
    expect(large.status).toBe(413);
    expect(large.body.error.code).toBe('payload_too_large');
  });

  it('refuses a state change from another origin', async () => {
    const { POST } = await import('@/app/api/outbreaks/route');
    const res = await call(POST as never, '/api/outbreaks', {
      method: 'POST', cookie: coordinator, headers: { origin: 'https://evil.example', host: 'localhost:3000' },
      body: { name: 'X', disease: 'Y', area: 'Z', population: 10, startDate: '2026-10-01' },
    });
    expect(res.status).toBe(403);
  });
});

describe('sessions', () => {
  it("refuses a deactivated user's existing session on the next request", async () => {
    const { createUser, updateUser } = await import('@/lib/db/users');
    const u = await createUser({ email: 'leaver@marrowbend.example', name: 'Leaver', role: 'field', password: 'a-long-password-1', teamIds: [DEMO_IDS.teamNorth], outbreakIds: [] });
    const cookie = await sessionCookie(u.email);
    const { GET } = await import('@/app/api/me/route');
    expect((await call(GET as never, '/api/me', { cookie })).status).toBe(200);
    await updateUser(u.id, { active: false });
    const after = await call(GET as never, '/api/me', { cookie });
    expect(after.status).toBe(401);
  });

  it('applies a role change on the next request', async () => {
    const { createUser, updateUser } = await import('@/lib/db/users');
    const u = await createUser({ email: 'mover@marrowbend.example', name: 'Mover', role: 'admin', password: 'a-long-password-2', teamIds: [], outbreakIds: [] });
    const cookie = await sessionCookie(u.email);
    const users = await import('@/app/api/users/route');
    expect((await call(users.GET as never, '/api/users', { cookie })).status).toBe(200);
    await updateUser(u.id, { role: 'supervisor' });
    // The old token carries the old session version: refused until the user signs in again.
    expect((await call(users.GET as never, '/api/users', { cookie })).status).toBe(401);
  });
});

describe('sign-in', () => {
  async function authorizeCall(email: string, password: string, ip = '10.0.0.1') {
    const { authOptions } = await import('@/lib/auth/options');
    const provider = authOptions.providers[0] as unknown as { options: { authorize: (c: unknown, r: unknown) => Promise<unknown> } };
    return provider.options.authorize({ email, password }, { headers: { 'x-forwarded-for': ip } });
  }

  it('accepts the demo password and refuses a wrong one', async () => {
    await expect(authorizeCall('field@marrowbend.example', 'ebbcast-demo')).resolves.toMatchObject({ email: 'field@marrowbend.example', role: 'field' });
    await expect(authorizeCall('field@marrowbend.example', 'wrong')).resolves.toBeNull();
  });

  it('backs off after 5 failures in a minute, per account, with a clear message', async () => {
    for (let i = 0; i < 5; i++) await expect(authorizeCall('supervisor@marrowbend.example', `nope-${i}`, `10.1.0.${i}`)).resolves.toBeNull();
    // Even the right password is refused during the back-off, from any address.
    await expect(authorizeCall('supervisor@marrowbend.example', 'ebbcast-demo', '10.9.9.9')).rejects.toThrow(/Too many failed sign-ins\. Try again in \d+ seconds/);
  });

  it('backs off per address too', async () => {
    for (let i = 0; i < 5; i++) await authorizeCall(`nobody${i}@x.example`, 'nope', '10.2.2.2');
    await expect(authorizeCall('coordinator@marrowbend.example', 'ebbcast-demo', '10.2.2.2')).rejects.toThrow(/Too many failed sign-ins/);
    await expect(authorizeCall('coordinator@marrowbend.example', 'ebbcast-demo', '10.3.3.3')).resolves.toMatchObject({ role: 'coordinator' });
  });
});
