import { test, expect, type APIResponse } from '@playwright/test';
import { signIn } from './helpers';

/** Pages of every kind (static shells, public, desk) and API responses of every kind (ok, 401, 404). */
const PAGES = ['/', '/signin', '/field', '/overview', '/entry', '/tallies', '/scenarios', '/forecast', '/sync', '/offline', '/admin', '/manage'];
const API = ['/api/health', '/api/me', '/api/outbreaks', '/api/no-such-route'];

function expectHeaders(res: APIResponse, what: string) {
  const h = res.headers();
  const csp = h['content-security-policy'] ?? '';
  expect(csp, what).toContain("default-src 'self'");
  expect(csp, what).toContain("frame-ancestors 'none'");
  expect(csp, what).toContain("object-src 'none'");
  expect(csp, what).toMatch(/worker-src 'self'/);
  expect(csp, what).not.toContain("'unsafe-eval'");
  expect(h['x-content-type-options'], what).toBe('nosniff');
  expect(h['referrer-policy'], what).toBe('strict-origin-when-cross-origin');
  expect(h['permissions-policy'], what).toContain('microphone=()');
  expect(h['x-frame-options'], what).toBe('DENY');
}

test('every page and API response carries the security headers', async ({ page }) => {
  await signIn(page, 'coordinator@marrowbend.example');
  for (const url of [...PAGES, ...API]) {
    const res = await page.request.get(url, { maxRedirects: 0 });
    expectHeaders(res, url);
  }
});

test('the session cookie is HttpOnly and SameSite', async ({ page, context }) => {
  await signIn(page, 'field@marrowbend.example');
  const cookie = (await context.cookies()).find((c) => c.name.endsWith('next-auth.session-token'));
  expect(cookie).toBeDefined();
  expect(cookie!.httpOnly).toBe(true);
  expect(cookie!.sameSite).toBe('Lax');
});

test('a state-changing call from another origin is refused', async ({ page }) => {
  await signIn(page, 'coordinator@marrowbend.example');
  const res = await page.request.post('/api/outbreaks', {
    headers: { origin: 'https://elsewhere.example' },
    data: { name: 'X', disease: 'Y', area: 'Z', population: 10, startDate: '2026-10-01' },
  });
  expect(res.status()).toBe(403);
});
