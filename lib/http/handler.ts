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
  return new AppError('internal', 'Something went wrong on the server. The request was not applied.');
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
  } catch {
    throw new AppError('invalid_json', 'The body is not valid JSON.');
  }
  const parsed = schema.safeParse(data);
  if (!parsed.success) throw validationError(parsed.error.issues);
  return parsed.data;
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
  if (!parsed.success) throw validationError(parsed.error.issues, 'Some query parameters are not valid.');
  return parsed.data;
}
