/**
 * Integration-test harness: a real temporary SQLite file per test file, real route handlers,
 * real next-auth session tokens (signed JWTs in the session cookie), no mocks of our own code.
 *
 * Import this module before anything that touches the database.
 */
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { NextRequest } from 'next/server';
import { encode } from 'next-auth/jwt';

const dir = mkdtempSync(path.join(tmpdir(), 'ebbcast-it-'));

/**
 * With `EBBCAST_TEST_PG` (a PostgreSQL server URL, e.g. postgres://postgres:pw@127.0.0.1:5432/postgres)
 * each test file gets a database of its own on that server instead of a SQLite file: the same
 * suite then checks the same models, migrations and routes on PostgreSQL.
 */
async function testDatabaseUrl(): Promise<string> {
  const server = process.env.EBBCAST_TEST_PG;
  if (!server) return `file:${path.join(dir, 'test.sqlite')}`;
  const { default: pg } = await import('pg');
  const name = `ebbcast_it_${path.basename(dir).replace(/[^a-z0-9]/gi, '').toLowerCase()}`;
  const client = new pg.Client({ connectionString: server });
  await client.connect();
  await client.query(`CREATE DATABASE ${name}`);
  await client.end();
  const url = new URL(server);
  url.pathname = `/${name}`;
  return url.toString();
}

process.env.DATABASE_URL = await testDatabaseUrl();
export const USING_POSTGRES = Boolean(process.env.EBBCAST_TEST_PG);
process.env.NEXTAUTH_SECRET = 'integration-test-secret-0123456789abcdef';
process.env.NEXTAUTH_URL = 'http://localhost:3000';
process.env.EBBCAST_DATA_DIR = dir;

export const TEST_DIR = dir;

type Handler = (req: NextRequest, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

/** Prepares the database with the demo seed, as `npm start` does. */
export async function prepare(): Promise<void> {
  const { prepareDatabase } = await import('@/lib/db/setup');
  await prepareDatabase({ quiet: true });
}

/** A session cookie for a user, as next-auth would set it after a sign-in. */
export async function sessionCookie(email: string): Promise<string> {
  const { User } = await import('@/models');
  const u = await User.findOne({ where: { email } });
  if (!u) throw new Error(`no user ${email}`);
  const token = await encode({ token: { sub: u.id, email: u.email, sessionVersion: u.sessionVersion }, secret: process.env.NEXTAUTH_SECRET! });
  return `next-auth.session-token=${token}`;
}

export interface CallOptions {
  method?: string;
  /** Sent as JSON unless `rawBody` is given. */
  body?: unknown;
  rawBody?: string | Uint8Array;
  contentType?: string;
  cookie?: string;
  params?: Record<string, string>;
  headers?: Record<string, string>;
}

/** Calls a route handler the way Next does, and returns the status and parsed JSON body. */
export async function call(handler: Handler, url: string, opts: CallOptions = {}): Promise<{ status: number; body: any; headers: Headers }> {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (opts.cookie) headers.cookie = opts.cookie;
  let body: BodyInit | undefined;
  if (opts.rawBody !== undefined) {
    body = opts.rawBody as BodyInit;
    if (opts.contentType) headers['content-type'] = opts.contentType;
  } else if (opts.body !== undefined) {
    body = JSON.stringify(opts.body);
    headers['content-type'] = opts.contentType ?? 'application/json';
  }
  const req = new NextRequest(new URL(url, 'http://localhost:3000'), { method: opts.method ?? 'GET', headers, body });
  const res = await handler(req, { params: Promise.resolve(opts.params ?? {}) });
  const text = await res.text();
  let parsed: unknown = text;
  try {
    parsed = text ? JSON.parse(text) : null;
  } catch {
    /* not JSON: keep the text */
  }
  return { status: res.status, body: parsed, headers: res.headers };
}
