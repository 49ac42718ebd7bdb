import { NextResponse } from 'next/server';
import { route } from '@/lib/http/handler';
import { AppError } from '@/lib/http/errors';
import { requestPasswordReset } from '@/lib/db/password-reset';
import { RESET_REQUEST_ANSWER, resetRequestSchema } from '@/lib/validation/mail';

export const runtime = 'nodejs';
export const dynamic = 'force-dynamic';

/** Per client address: at most 10 requests a minute (the per-account limit is in the data function). */
const WINDOW_MS = 60_000;
const MAX_PER_WINDOW = 10;
const g = globalThis as unknown as { __ebbcastResetThrottle?: Map<string, number[]> };
const hits: Map<string, number[]> = (g.__ebbcastResetThrottle ??= new Map<string, number[]>());

function throttle(address: string) {
  const now = Date.now();
  const list = (hits.get(address) ?? []).filter((t) => now - t < WINDOW_MS);
  if (list.length >= MAX_PER_WINDOW) {
    throw new AppError('rate_limited', 'Too many requests from this device. Wait a minute and try again.', { detail: { retryAfter: 60 } });
  }
  list.push(now);
  hits.set(address, list);
}

/**
 * "Forgot password": the same status and body whether or not the address has an account; the
 * message, if any, is sent in the background so the timing does not tell either.
 */
export const POST = route({ public: true, body: resetRequestSchema }, async ({ req, body }) => {
  const address = req.headers.get('x-forwarded-for')?.split(',')[0]?.trim() || req.headers.get('x-real-ip') || 'local';
  throttle(address);
  await requestPasswordReset(body.email, { address });
  return NextResponse.json(RESET_REQUEST_ANSWER, { status: 202 });
});
