import { call, prepare, sessionCookie } from '../helpers/server';
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import { linkToken, mailTo, startTestCatcher } from './mail-helpers';
import type { Catcher } from '../../scripts/mail-catcher.mjs';

let catcher: Catcher;

beforeAll(async () => {
  await prepare();
  catcher = await startTestCatcher();
});
afterAll(async () => {
  await catcher?.close();
});
afterEach(() => {
  vi.useRealTimers();
});

async function ask(email: string, address = '10.0.0.1') {
  const { POST } = await import('@/app/api/auth/password-reset/route');
  const res = await call(POST as never, '/api/auth/password-reset', { method: 'POST', body: { email }, headers: { 'x-forwarded-for': address } });
  const { settleMail } = await import('@/lib/mail/transport');
  await settleMail();
  return res;
}
async function confirm(token: string, password: string) {
  const { POST } = await import('@/app/api/auth/password-reset/confirm/route');
  return call(POST as never, '/api/auth/password-reset/confirm', { method: 'POST', body: { token, password } });
}

describe('forgot password', () => {
  it('answers an unknown address exactly like a known one, and mails only the known one', async () => {
    const known = await ask('field2@marrowbend.example');
    const unknown = await ask('nobody@marrowbend.example');
    expect(unknown.status).toBe(known.status);
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    expect(unknown.headers.get('content-type')).toBe(known.headers.get('content-type'));
    expect(await mailTo('field2@marrowbend.example')).toHaveLength(1);
    expect(await mailTo('nobody@marrowbend.example')).toHaveLength(0);
    // Both requests are in the ledger; only the known one names a user.
    const { LedgerEntry } = await import('@/models');
    const rows = await LedgerEntry.findAll({ where: { kind: 'reset_requested' }, order: [['id', 'ASC']] });
    expect(rows.map((r) => JSON.parse(r.detail!).known)).toEqual([true, false]);
    expect(rows[1]!.userId).toBeNull();
  });

  it('a deactivated account gets the same answer and no message', async () => {
    const { createUser } = await import('@/lib/db/users');
    await createUser({ email: 'gone@marrowbend.example', name: 'Gone', role: 'field', password: 'a-long-password-1', teamIds: [], outbreakIds: [] });
    const { User } = await import('@/models');
    await User.update({ active: false }, { where: { email: 'gone@marrowbend.example' } });
    const known = await ask('field2@marrowbend.example', '10.0.0.2');
    const gone = await ask('gone@marrowbend.example', '10.0.0.2');
    expect([gone.status, gone.body]).toEqual([known.status, known.body]);
    expect(await mailTo('gone@marrowbend.example')).toHaveLength(0);
  });

  it('the newest link sets a new password once, ends other sessions, and is refused when reused', async () => {
    const before = await sessionCookie('field2@marrowbend.example');
    const mails = await mailTo('field2@marrowbend.example');
    const oldest = linkToken(mails[0]!.text, 'reset');
    const newest = linkToken(mails[mails.length - 1]!.text, 'reset');
    // An earlier link was replaced by the newer request.
    expect((await confirm(oldest, 'a-brand-new-password')).body.error.reason).toBe('used');
    const ok = await confirm(newest, 'a-brand-new-password');
    expect(ok.status).toBe(200);
    const { verifyCredentials } = await import('@/lib/db/users');
    expect(await verifyCredentials('field2@marrowbend.example', 'a-brand-new-password')).not.toBeNull();
    expect(await verifyCredentials('field2@marrowbend.example', 'ebbcast-demo')).toBeNull();
    const { GET } = await import('@/app/api/me/route');
    expect((await call(GET as never, '/api/me', { cookie: before })).status).toBe(401);
    const reused = await confirm(newest, 'yet-another-password');
    expect(reused.status).toBe(400);
    expect(reused.body.error.reason).toBe('used');
    expect(await verifyCredentials('field2@marrowbend.example', 'yet-another-password')).toBeNull();
    const { LedgerEntry } = await import('@/models');
    expect(await LedgerEntry.count({ where: { kind: 'reset_done' } })).toBe(1);
  });

  it('a link works for one hour: accepted at 59 minutes, refused at 61', async () => {
    const t0 = Date.now();
    await ask('field@marrowbend.example', '10.0.0.3');
    const mails = await mailTo('field@marrowbend.example');
    const token = linkToken(mails[mails.length - 1]!.text, 'reset');
    const { GET } = await import('@/app/api/auth/password-reset/confirm/route');
    vi.useFakeTimers({ toFake: ['Date'], now: t0 + 59 * 60_000 });
    expect((await call(GET as never, `/api/auth/password-reset/confirm?token=${token}`)).status).toBe(200);
    vi.setSystemTime(t0 + 61 * 60_000);
    const late = await confirm(token, 'a-brand-new-password');
    expect(late.status).toBe(400);
    expect(late.body.error.reason).toBe('expired');
    expect(late.body.error.message).toMatch(/expired/);
  });

  it('sends at most three links an hour to one address, with the same answer each time', async () => {
    const email = 'coordinator@marrowbend.example';
    const answers = [];
    for (let i = 0; i < 5; i++) answers.push(await ask(email, `10.0.1.${i}`));
    expect(new Set(answers.map((a) => JSON.stringify([a.status, a.body]))).size).toBe(1);
    expect(await mailTo(email)).toHaveLength(3);
  });

  it('refuses a password shorter than 12 characters and keeps the link usable', async () => {
    await ask('supervisor@marrowbend.example', '10.0.0.9');
    const token = linkToken((await mailTo('supervisor@marrowbend.example'))[0]!.text, 'reset');
    const short = await confirm(token, 'short-pass');
    expect(short.status).toBe(400);
    expect(short.body.error.fields.password).toMatch(/12/);
    expect((await confirm(token, 'a-long-enough-password')).status).toBe(200);
  });
});
