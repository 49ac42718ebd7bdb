/**
 * The fixtures of the role × route matrix (route-matrix.test.ts): for every route file and
 * exported method, one valid request against the Marrow Bend demo (lib/db/demo.ts ids) and the
 * outcome expected for each actor. A route or method without a row here fails the matrix, so a
 * new route cannot ship without someone deciding who may call it.
 *
 * Keys are `<METHOD> <folder under app/api>`, e.g. `GET outbreaks/[id]/sites`.
 * Expected outcomes follow lib/auth/roles.ts (the one permission table) [cp: PRODUCT.md roles].
 */
import { DEMO_IDS } from '@/lib/db/demo';

export const ACTORS = ['anon', 'field', 'field2', 'coordinator', 'supervisor', 'admin', 'outsider'] as const;
export type ActorName = (typeof ACTORS)[number];

/**
 * - `ok`: 2xx (or the fixture's `okStatus`);
 * - `deny`: 403 `forbidden`, and the body holds nothing but the error;
 * - `unauth`: 401 `unauthenticated`, nothing but the error;
 * - `reject`: a sync push answered 200 in which every mutation is `rejected` with no record (scope refusal per mutation, SYNC.md 8).
 */
export type Outcome = 'ok' | 'deny' | 'unauth' | 'reject';

/** What a fixture may ask of the test harness; every helper makes fresh rows so that calls do not interfere. */
export interface MatrixCtx {
  actor: ActorName;
  /** A call counter, unique per request, for unique names, dates and e-mail addresses. */
  n: number;
  /** A live scenario of the demo outbreak, made by the demo coordinator. */
  newScenario(): Promise<string>;
  /** A fresh active field user (for PATCH /api/users/[id]). */
  newUser(): Promise<string>;
  /** The actor's registered device and the next seq it must send (a random unregistered id for actors that cannot register one). */
  device(): Promise<{ deviceId: string; nextSeq: number }>;
  inviteToken(): Promise<string>;
  resetToken(): Promise<string>;
  /** The id of a message caught by the local mail catcher. */
  mailId(): Promise<string>;
  /** A fresh site of the demo outbreak (North team unless told), with no tallies yet. */
  newSite(team?: 'north' | 'lakeshore'): Promise<string>;
  /** A tally (version 1) of a fresh North site, recorded today by the coordinator. */
  newTally(): Promise<{ id: string; siteId: string; date: string; version: number }>;
  /** An open conflict (duplicate day) on a fresh North site. */
  newConflict(): Promise<{ id: string; version: number; currentVersion: number }>;
  /** A stored tally sheet (PNG) of a fresh North site, uploaded by the coordinator. */
  newSheet(): Promise<{ id: string; siteId: string }>;
  /** Today, UTC, `YYYY-MM-DD` (a day the demo outbreak accepts tallies for). */
  today: string;
  /** Scratch space shared by one request's params, query and body functions (they run in that order). */
  state: Record<string, unknown>;
}

export interface RawBody {
  body: string | Uint8Array;
  contentType: string;
}

/** The smallest file the sheet check accepts as PNG: the 8-byte signature (RFC 2083 §3.1) and a few bytes. */
export const PNG_BYTES = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);

/** A multipart/form-data body as a browser sends it (built by undici's own FormData encoder). */
export async function multipart(fields: Record<string, string>, file?: { name: string; bytes: Uint8Array; type?: string }): Promise<RawBody> {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  if (file) form.set('file', new Blob([new Uint8Array(file.bytes)], { type: file.type ?? 'application/octet-stream' }), file.name);
  const req = new Request('http://form.invalid/', { method: 'POST', body: form });
  return { body: new Uint8Array(await req.arrayBuffer()), contentType: req.headers.get('content-type')! };
}

export interface Fixture {
  /** Route params (the dynamic segments). */
  params?: (ctx: MatrixCtx) => Promise<Record<string, string | string[]>> | Record<string, string | string[]>;
  /** Query string without `?`. */
  query?: (ctx: MatrixCtx) => Promise<string> | string;
  /** Concrete path when it differs from the folder (catch-all routes). */
  path?: string;
  /** JSON body. */
  body?: (ctx: MatrixCtx) => Promise<unknown> | unknown;
  /** A raw body with its own content type (CSV uploads). */
  raw?: (ctx: MatrixCtx) => Promise<RawBody> | RawBody;
  /**
   * Not callable in this process, with the reason and where it is covered instead. next-auth's
   * handler reads cookies() from Next's request scope, which only a real server provides.
   */
  outOfProcess?: string;
  expect: Record<ActorName, Outcome>;
  /** Statuses that count as `ok` besides 2xx (next-auth answers its form posts with a redirect). */
  okStatus?: number[];
  /** Ids that may appear in an `ok` answer to field2 / outsider even though they are another team's or outbreak's (with the reason). */
  mayShow?: Partial<Record<ActorName, { ids: string[]; why: string }>>;
  /** Why the expectation is what it is, when it is not obvious from the permission table. */
  note?: string;
}

const SIGNED_IN: ActorName[] = ['field', 'field2', 'coordinator', 'supervisor', 'admin', 'outsider'];

/** Outcomes: signed out 401; the listed actors allowed; every other actor 403. */
export function only(...allowed: ActorName[]): Record<ActorName, Outcome> {
  const out = { anon: 'unauth' } as Record<ActorName, Outcome>;
  for (const a of SIGNED_IN) out[a] = allowed.includes(a) ? 'ok' : 'deny';
  return out;
}
/** A public route: every actor, signed in or not, gets the same outcome. */
export const everyone = (o: Outcome = 'ok'): Record<ActorName, Outcome> =>
  Object.fromEntries(ACTORS.map((a) => [a, o])) as Record<ActorName, Outcome>;
export const anySignedIn = () => only(...SIGNED_IN);
const withOverrides = (base: Record<ActorName, Outcome>, over: Partial<Record<ActorName, Outcome>>) => ({ ...base, ...over });

const O = DEMO_IDS.outbreak;
const demo = () => ({ id: O });

/** A small valid ScenarioInput (lib/validation/scenario.ts) for the demo district. */
export const scenarioInput = (beta = 0.5) => ({
  model: 'SIR', population: 12660, initial: { I: 3 }, params: { beta, gamma: 0.25 }, method: 'rk4', step: 0.5, days: 60,
});

/** Ids of the North team's sites: a field officer of Lakeshore must not see them, nor may an outsider. */
export const NORTH_SITES = [DEMO_IDS.alderCamp, DEMO_IDS.northgateSchool, DEMO_IDS.hollinCrossing];

export const FIXTURES: Record<string, Fixture> = {
  // ---- sign-in (next-auth's own handler; public by nature) ----
  'GET auth/[...nextauth]': {
    expect: everyone('ok'),
    outOfProcess: 'next-auth (csrf, session, providers): public by design; tests/e2e/sign-in.spec.ts and bench/load.ts sign in through it on a real server',
  },
  'POST auth/[...nextauth]': {
    expect: everyone('ok'),
    outOfProcess: 'next-auth credentials callback and sign-out: tests/e2e/sign-in.spec.ts and bench/load.ts (GET /api/auth/csrf + POST /api/auth/callback/credentials)',
  },
  'GET auth/invitation': { query: async (c) => `token=${await c.inviteToken()}`, expect: everyone('ok') },
  'POST auth/invitation': { body: async (c) => ({ token: await c.inviteToken(), password: 'a-long-password-for-matrix' }), expect: everyone('ok') },
  'POST auth/password-reset': { body: (c) => ({ email: c.n % 2 ? 'field@marrowbend.example' : `nobody-${c.n}@elsewhere.example` }), expect: everyone('ok') },
  'GET auth/password-reset/confirm': { query: async (c) => `token=${await c.resetToken()}`, expect: everyone('ok') },
  'POST auth/password-reset/confirm': { body: async (c) => ({ token: await c.resetToken(), password: 'another-long-password-1' }), expect: everyone('ok') },
  'GET health': { expect: everyone('ok') },

  // ---- the signed-in user and devices ----
  'GET me': { expect: anySignedIn() },
  'GET devices': {
    expect: anySignedIn(),
    note: 'Every signed-in user may list devices; field officers see only their own (checked in the test).',
  },
  'POST devices': {
    body: (c) => ({ id: crypto.randomUUID(), label: `Matrix tablet ${c.n}` }),
    expect: only('field', 'field2', 'coordinator', 'supervisor', 'outsider'),
    note: 'Registering needs sync:pull, which admins do not have.',
  },

  // ---- outbreaks, teams, sites ----
  'GET outbreaks': { expect: anySignedIn() },
  'POST outbreaks': {
    body: (c) => ({ name: `Matrix outbreak ${c.n}`, disease: 'ILI', area: 'Matrix district', population: 1000, startDate: '2026-01-01' }),
    expect: only('coordinator', 'outsider'),
    note: 'outbreak:manage: any coordinator may open a new outbreak (and becomes responsible for it).',
  },
  'GET outbreaks/[id]': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor', 'admin') },
  'GET outbreaks/[id]/sites': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor', 'admin') },
  'POST outbreaks/[id]/sites': {
    params: demo,
    body: (c) => ({ name: `Matrix site ${c.n}`, kind: 'camp', population: 100, teamId: DEMO_IDS.teamNorth }),
    expect: only('coordinator'),
  },
  'GET outbreaks/[id]/teams': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor', 'admin') },
  'POST outbreaks/[id]/teams': { params: demo, body: (c) => ({ name: `Matrix team ${c.n}` }), expect: only('coordinator') },

  // ---- scenarios and runs ----
  'GET outbreaks/[id]/scenarios': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'POST outbreaks/[id]/scenarios': {
    params: demo,
    body: (c) => ({ id: crypto.randomUUID(), name: `Matrix scenario ${c.n}`, input: scenarioInput() }),
    expect: only('field', 'field2', 'coordinator'),
  },
  'GET scenarios/[id]': { params: async (c) => ({ id: await c.newScenario() }), expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'PUT scenarios/[id]': {
    params: async (c) => ({ id: await c.newScenario() }),
    body: (c) => ({ name: `Matrix edit ${c.n}`, input: scenarioInput(0.6) }),
    expect: only('field', 'field2', 'coordinator'),
  },
  'DELETE scenarios/[id]': { params: async (c) => ({ id: await c.newScenario() }), expect: only('field', 'field2', 'coordinator') },
  'POST scenarios/[id]/official': {
    params: async (c) => ({ id: await c.newScenario() }),
    body: () => ({ official: true }),
    expect: only('coordinator'),
  },
  'POST runs': {
    body: () => ({ input: scenarioInput() }),
    expect: anySignedIn(),
    note: 'run:compute is pure computation on the request: every role has it, and it reads no stored data.',
  },

  // ---- sync ----
  // ---- tallies ----
  'GET outbreaks/[id]/tallies': { params: demo, query: () => 'limit=1000', expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'POST outbreaks/[id]/tallies': {
    params: demo,
    body: async (c) => ({ siteId: await c.newSite(), date: c.today, newCases: 4, note: 'matrix' }),
    expect: only('field', 'coordinator'),
    note: "A North site: Lakeshore's field officer is refused by team scope.",
  },
  'POST tallies': {
    body: async (c) => ({ id: crypto.randomUUID(), siteId: await c.newSite(), date: c.today, newCases: 2 }),
    expect: only('field', 'coordinator'),
  },
  'GET tallies/[id]': { params: async (c) => ({ id: (await c.newTally()).id }), expect: only('field', 'coordinator', 'supervisor') },
  'PUT tallies/[id]': {
    params: async (c) => {
      const t = await c.newTally();
      c.state.tally = t;
      return { id: t.id };
    },
    body: (c) => {
      const t = c.state.tally as { siteId: string; date: string; version: number };
      return { siteId: t.siteId, date: t.date, newCases: 9, baseVersion: t.version };
    },
    expect: only('field', 'coordinator'),
  },
  'DELETE tallies/[id]': {
    params: async (c) => {
      const t = await c.newTally();
      c.state.tally = t;
      return { id: t.id };
    },
    query: (c) => `baseVersion=${(c.state.tally as { version: number }).version}`,
    expect: only('field', 'coordinator'),
  },
  'GET outbreaks/[id]/tallies/export': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'GET outbreaks/[id]/tallies/grid': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'GET outbreaks/[id]/curve': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'POST outbreaks/[id]/tallies/import': {
    params: demo,
    query: () => 'mode=preview',
    raw: (c) => ({ contentType: 'text/csv', body: `site,date,newCases\r\nAlder Camp,${c.today},5\r\n` }),
    expect: only('coordinator'),
  },

  // ---- tally sheets (uploads) ----
  'POST uploads': {
    raw: async (c) => multipart({ clientId: crypto.randomUUID(), siteId: await c.newSite(), date: c.today }, { name: 'sheet.png', bytes: PNG_BYTES, type: 'image/png' }),
    expect: only('field', 'coordinator'),
    note: 'upload:write on a North site: Lakeshore is refused by team scope; supervisors and admins do not upload.',
  },
  'GET uploads': {
    query: async (c) => `siteId=${(await c.newSheet()).siteId}`,
    expect: only('field', 'coordinator', 'supervisor'),
  },
  'GET uploads/[id]': { params: async (c) => ({ id: (await c.newSheet()).id }), expect: only('field', 'coordinator', 'supervisor') },

  // ---- sitrep ----
  'GET outbreaks/[id]/sitrep': { params: demo, expect: only('field', 'field2', 'coordinator', 'supervisor') },
  'POST outbreaks/[id]/sitrep/send': { params: demo, body: () => ({}), expect: only('coordinator') },
  'POST outbreaks/[id]/sitrep/capacity-check': { params: demo, body: () => ({}), expect: only('coordinator') },

  // ---- merge desk and ledger ----
  'GET conflicts': { query: () => `outbreak=${O}&status=all`, expect: only('coordinator') },
  'POST conflicts/[id]/settle': {
    params: async (c) => {
      const k = await c.newConflict();
      c.state.conflict = k;
      return { id: k.id };
    },
    body: (c) => {
      const k = c.state.conflict as { version: number; currentVersion: number };
      return { settlement: 'keep_current', reason: 'matrix check', conflictVersion: k.version, currentVersion: k.currentVersion };
    },
    expect: only('coordinator'),
  },
  'GET ledger': { query: () => 'limit=200', expect: only('coordinator', 'supervisor', 'admin', 'outsider') },
  'GET ledger/verify': { expect: only('coordinator', 'supervisor', 'admin', 'outsider') },
  'GET ledger/export': { expect: only('supervisor') },

  'GET sync/pull': { query: () => 'cursor=0&limit=2000', expect: only('field', 'field2', 'coordinator', 'supervisor', 'outsider') },
  'POST sync/push': {
    body: async (c) => {
      const { deviceId, nextSeq } = await c.device();
      return {
        deviceId,
        mutations: [{
          mutationId: crypto.randomUUID(), seq: nextSeq, entity: 'tally', entityId: crypto.randomUUID(), op: 'upsert', baseVersion: null,
          payload: { siteId: await c.newSite(), date: c.today, newCases: 3 }, recordedAt: new Date().toISOString(),
        }],
      };
    },
    // A tally of a North site: Lakeshore's field officer and an outsider's push is answered per mutation.
    expect: withOverrides(only('field', 'field2', 'coordinator', 'outsider'), { field2: 'reject', outsider: 'reject' }),
  },

  // ---- people and mail ----
  'GET users': { expect: only('admin') },
  'POST users': { body: (c) => ({ email: `matrix-user-${c.n}@marrowbend.example`, name: `Matrix user ${c.n}`, role: 'field', teamIds: [DEMO_IDS.teamNorth] }), expect: only('admin') },
  'PATCH users/[id]': { params: async (c) => ({ id: await c.newUser() }), body: (c) => ({ name: `Renamed ${c.n}` }), expect: only('admin') },
  'GET invitations': { expect: only('coordinator', 'admin', 'outsider') },
  'POST invitations': {
    body: (c) => ({ email: `matrix-invite-${c.n}@marrowbend.example`, name: `Invitee ${c.n}`, role: 'field', teamIds: [DEMO_IDS.teamNorth] }),
    expect: only('coordinator', 'admin'),
    note: "An outsider coordinator may send invitations, but not into the demo outbreak's team.",
  },
  'GET mail': { expect: only('admin') },
  'GET mail/[id]': { params: async (c) => ({ id: await c.mailId() }), expect: only('admin') },
};

/**
 * Rows in every table of the test database (SQLite or PostgreSQL), to show that a refused
 * request wrote nothing. Imported lazily so that this file stays loadable before the harness.
 */
export async function countRows(): Promise<Record<string, number>> {
  const { db, dialect } = await import('@/lib/db/connection');
  const { QueryTypes } = await import('sequelize');
  const s = await db();
  const tables =
    dialect() === 'sqlite'
      ? (await s.query<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'", { type: QueryTypes.SELECT })).map((r) => r.name)
      : (await s.query<{ name: string }>("SELECT tablename AS name FROM pg_tables WHERE schemaname = 'public'", { type: QueryTypes.SELECT })).map((r) => r.name);
  const out: Record<string, number> = {};
  for (const t of tables.sort()) {
    const [row] = await s.query<{ n: number | string }>(`SELECT COUNT(*) AS n FROM "${t}"`, { type: QueryTypes.SELECT });
    out[t] = Number(row!.n);
  }
  return out;
}

/** Tables whose row count changed, as `table +n`. */
export function diffCounts(before: Record<string, number>, after: Record<string, number>): string[] {
  const names = new Set([...Object.keys(before), ...Object.keys(after)]);
  return [...names].filter((t) => (before[t] ?? 0) !== (after[t] ?? 0)).map((t) => `${t} ${(after[t] ?? 0) - (before[t] ?? 0) >= 0 ? '+' : ''}${(after[t] ?? 0) - (before[t] ?? 0)}`);
}

/**
 * A fingerprint of the whole database: per table its row count and, where it has them, the
 * largest `updated_at` and the sum of `version` — so an update in place shows as well as an insert.
 * One query, so a property test can take it thousands of times.
 */
let fingerprintSql: string | null = null;
export async function fingerprint(): Promise<string> {
  const { db, dialect } = await import('@/lib/db/connection');
  const { QueryTypes } = await import('sequelize');
  const s = await db();
  if (!fingerprintSql) {
    const parts: string[] = [];
    const counts = await countRows();
    for (const t of Object.keys(counts)) {
      const cols =
        dialect() === 'sqlite'
          ? (await s.query<{ name: string }>(`PRAGMA table_info("${t}")`, { type: QueryTypes.SELECT })).map((c) => c.name)
          : (await s.query<{ name: string }>(`SELECT column_name AS name FROM information_schema.columns WHERE table_name = '${t}'`, { type: QueryTypes.SELECT })).map((c) => c.name);
      parts.push(`(SELECT COUNT(*) FROM "${t}")`);
      if (cols.includes('updated_at')) parts.push(`(SELECT MAX(updated_at) FROM "${t}")`);
      if (cols.includes('version')) parts.push(`(SELECT SUM(version) FROM "${t}")`);
    }
    fingerprintSql = `SELECT ${parts.map((p, i) => `${p} AS c${i}`).join(', ')}`;
  }
  const [row] = await s.query<Record<string, unknown>>(fingerprintSql, { type: QueryTypes.SELECT });
  return JSON.stringify(row);
}
