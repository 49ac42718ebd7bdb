import { NextResponse, type NextRequest } from 'next/server';
import type { z } from 'zod';
import type { Actor } from '@/lib/auth/actor';
import { getActorFromRequest } from '@/lib/auth/session';
import { AppError, validationError } from './errors';

/** Default limit of a JSON body (bytes); a route may set its own (`maxBytes`). */
export const DEFAULT_MAX_BODY = 1024 * 1024;

export interface HandlerContext<B, Q> {
  req: NextRequest;
  /** The signed-in actor; present unless the route is declared `public`. */
  actor: Actor;
  body: B;
  query: Q;
  params: Record<string, string>;
}

interface RouteOptions<B, Q> {
  /** Skip the sign-in check (health, public forms). */
  public?: boolean;
  body?: z.ZodType<B>;
  query?: z.ZodType<Q>;
  maxBytes?: number;
}

type NextCtx = { params: Promise<Record<string, string | string[]>> };

/**
 * Wraps a route handler with the one API convention: the session check (401), the JSON body
 * checks (415 content type, 413 size, 400 malformed JSON, 400 invalid fields with zod paths),
 * the query check, a same-origin check on state-changing calls (403), and one error shape for
 * every failure. The handler returns plain data (sent as JSON 200) or a Response.
 */
export function route<B = undefined, Q = Record<string, never>>(
  opts: RouteOptions<B, Q>,
  fn: (ctx: HandlerContext<B, Q>) => Promise<unknown>,
) {
  return async (req: NextRequest, nextCtx?: NextCtx): Promise<Response> => {
    try {
      checkOrigin(req);
      const actor = opts.public ? null : await getActorFromRequest(req);
      if (!opts.public && !actor) throw new AppError('unauthenticated', 'Please sign in to continue.');
      const body = opts.body ? await readJson(req, opts.body, opts.maxBytes ?? DEFAULT_MAX_BODY) : (undefined as B);
      const query = opts.query ? parseQuery(req, opts.query) : ({} as Q);
      const raw = (await nextCtx?.params) ?? {};
      const params = Object.fromEntries(Object.entries(raw).map(([k, v]) => [k, Array.isArray(v) ? v.join('/') : v]));
      const result = await fn({ req, actor: actor as Actor, body, query, params });
      if (result instanceof Response) return result;
      return NextResponse.json(result ?? { ok: true });
    } catch (err) {
      return errorResponse(err);
    }
  };
}

/** Any thrown value as the one error shape. Unknown errors are logged and answer 500. */
export function errorResponse(err: unknown): Response {
  const appErr = toAppError(err);
  if (appErr.status >= 500) console.error(err);
  return NextResponse.json(appErr.toBody(), {
    status: appErr.status,
    headers: appErr.code === 'rate_limited' && appErr.detail?.retryAfter ? { 'Retry-After': String(appErr.detail.retryAfter) } : undefined,
  });
}

export function toAppError(err: unknown): AppError {
  if (err instanceof AppError) return err;
  // Errors of the numerical core carry a field and a code (lib/model); they are bad input.
  const e = err as { name?: string; code?: string; field?: string; message?: string };
  if (e && e.name === 'ModelError' && typeof e.message === 'string') {
    return new AppError(e.code === 'limit_exceeded' ? 'unprocessable' : 'validation_failed', e.message, {
      fields: e.field ? { [e.field]: e.message } : undefined,
    });
  }
  // PostgreSQL refuses a malformed UUID in a lookup (SQLSTATE 22P02) where SQLite just finds no
  // row: an id from the path that is not a UUID names no record, so answer as SQLite does.
  if (driverError(err, (c, m) => c === '22P02' && /uuid/i.test(m))) return new AppError('not_found', 'Nothing was found with this id.');
  const storage = storageFault(err);
  if (storage) return new AppError('unavailable', storage, { detail: { retryable: true } });
  return new AppError('internal', 'Something went wrong on the server. The request was not applied.');
}

/**
 * Database conditions that are the server's state, not the request's fault: the client should
 * keep its data (the outbox does) and retry later. The transaction was rolled back, so nothing
 * of the request was applied. Codes: sqlite3's `SQLITE_*`; PostgreSQL SQLSTATE 53100 disk_full,
 * 53200 out_of_memory, 25006 read_only_sql_transaction, 57P01-57P03 shutdown, 08xxx connection.
 */
const STORAGE_FAULTS: Array<[RegExp, string]> = [
  [/^(SQLITE_READONLY|25006)$/, 'The database is read-only at the moment. Nothing was saved; try again later (your device keeps its changes).'],
  [/^(SQLITE_FULL|53100)$/, 'The server is out of disk space. Nothing was saved; try again later (your device keeps its changes).'],
  [/^(SQLITE_BUSY|SQLITE_LOCKED|55P03|40P01)$/, 'The database is busy. Nothing was saved; try again in a moment.'],
  [/^(SQLITE_IOERR|SQLITE_CANTOPEN|53200|57P0[123]|08\w{3})$/, 'The database is not reachable at the moment. Nothing was saved; try again later.'],
];

type DriverError = { code?: unknown; message?: unknown; parent?: unknown; original?: unknown; name?: unknown };

/** True when `err` or an error it wraps (Sequelize's `parent`/`original`) matches. */
function driverError(err: unknown, match: (code: string, message: string, name: string) => boolean): boolean {
  const seen = new Set<unknown>();
  for (let e = err as DriverError | undefined; e && typeof e === 'object' && !seen.has(e); e = (e.parent ?? e.original) as DriverError | undefined) {
    seen.add(e);
    if (match(typeof e.code === 'string' ? e.code : '', typeof e.message === 'string' ? e.message : '', typeof e.name === 'string' ? e.name : '')) return true;
  }
  return false;
}

function storageFault(err: unknown): string | null {
  for (const [re, message] of STORAGE_FAULTS) if (driverError(err, (code) => re.test(code))) return message;
  const connection = /^Sequelize(Connection|ConnectionRefused|ConnectionAcquireTimeout|HostNotReachable)Error$/;
  if (driverError(err, (_c, _m, name) => connection.test(name))) return 'The database is not reachable at the moment. Nothing was saved; try again later.';
  return null;
}

const STATE_CHANGING = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/** Browsers send Origin on cross-site requests: refuse state changes from another origin. */
function checkOrigin(req: NextRequest) {
  if (!STATE_CHANGING.has(req.method)) return;
  const origin = req.headers.get('origin');
  if (!origin) return;
  const host = req.headers.get('x-forwarded-host') ?? req.headers.get('host');
  let originHost: string;
  try {
    originHost = new URL(origin).host;
  } catch {
    throw new AppError('forbidden', 'Cross-site request refused.');
  }
  if (host && originHost !== host) throw new AppError('forbidden', 'Cross-site request refused.');
}

export async function readJson<B>(req: Request, schema: z.ZodType<B>, maxBytes = DEFAULT_MAX_BODY): Promise<B> {
  const type = (req.headers.get('content-type') ?? '').split(';')[0]!.trim().toLowerCase();
  if (type !== 'application/json') {
    throw new AppError('unsupported_media_type', 'Send the body as JSON (Content-Type: application/json).');
  }
  const declared = Number(req.headers.get('content-length') ?? '0');
  if (declared > maxBytes) throw tooLarge(maxBytes);
  const text = await readLimited(req, maxBytes);
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    // The parser's own words point at the spot (e.g. a bare NaN); JSON has no NaN or Infinity.
    const where = e instanceof SyntaxError ? e.message.slice(0, 160) : 'unreadable';
    throw new AppError('invalid_json', `The body is not valid JSON (${where}). Numbers must be finite: JSON has no NaN or Infinity.`);
  }
  const parsed = schema.safeParse(data);
  if (!parsed.success) throw validationError(perKeyIssues(parsed.error.issues));
  return parsed.data;
}

type Issue = { path: ReadonlyArray<PropertyKey>; message: string; code?: string; keys?: readonly string[] };

/**
 * zod reports unknown keys of a strict object as one issue at the object's path; split it so that
 * `fields` names each key (`__proto__`, `isAdmin`), which is what the client needs to fix.
 */
function perKeyIssues(issues: ReadonlyArray<Issue>): Issue[] {
  return issues.flatMap((i) =>
    i.code === 'unrecognized_keys' && i.keys?.length
      ? i.keys.map((k) => ({ path: [...i.path, k], message: 'Not a field of this request.' }))
      : [i],
  );
}

const tooLarge = (max: number) =>
  new AppError('payload_too_large', `The body is larger than the limit of ${Math.round(max / 1024)} KiB.`);

/** Reads the body as text, stopping as soon as it passes the limit (a missing or false length is no way round it). */
async function readLimited(req: Request, maxBytes: number): Promise<string> {
  if (!req.body) return '';
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(maxBytes);
    }
    chunks.push(value);
  }
  return new TextDecoder('utf-8', { fatal: false }).decode(Buffer.concat(chunks));
}

function parseQuery<Q>(req: NextRequest, schema: z.ZodType<Q>): Q {
  const obj: Record<string, string> = {};
  for (const [k, v] of req.nextUrl.searchParams) obj[k] = v;
  const parsed = schema.safeParse(obj);
  if (!parsed.success) throw validationError(perKeyIssues(parsed.error.issues), 'Some query parameters are not valid.');
  return parsed.data;
}
