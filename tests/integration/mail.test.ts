import { TEST_DIR, call, prepare, sessionCookie } from '../helpers/server';
import { existsSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startCatcher } from '../../scripts/mail-catcher.mjs';
import { mailTo, startTestCatcher } from './mail-helpers';
import type { Catcher } from '../../scripts/mail-catcher.mjs';

let catcher: Catcher;

beforeAll(async () => {
  await prepare();
  catcher = await startTestCatcher();
});
afterAll(async () => {
  await catcher?.close();
});

describe('MIME reading', () => {
  it('decodes the encoded-word examples of RFC 2047 §8', async () => {
    const { decodeWords } = await import('@/lib/mail/mime');
    // [pub] RFC 2047 §8 examples (encoded form → displayed form).
    expect(decodeWords('=?ISO-8859-1?Q?Andr=E9?= Pirard')).toBe('André Pirard');
    expect(decodeWords('(=?ISO-8859-1?Q?a?=)')).toBe('(a)');
    expect(decodeWords('(=?ISO-8859-1?Q?a?= b)')).toBe('(a b)');
    expect(decodeWords('(=?ISO-8859-1?Q?a?= =?ISO-8859-1?Q?b?=)')).toBe('(ab)');
    expect(decodeWords('(=?ISO-8859-1?Q?a_b?=)')).toBe('(a b)');
    expect(decodeWords('=?US-ASCII?Q?Keith_Moore?=')).toBe('Keith Moore');
  });

  it('decodes quoted-printable with soft line breaks (RFC 2045 §6.7)', async () => {
    const { decodeQuotedPrintable } = await import('@/lib/mail/mime');
    // [pub] RFC 2045 §6.7 rules 1 and 5: "=XX" is one octet; "=" at a line end is a soft break.
    expect(decodeQuotedPrintable('a=3Db').toString()).toBe('a=b');
    expect(decodeQuotedPrintable('soft=\r\nbreak').toString()).toBe('softbreak');
    expect(decodeQuotedPrintable('caf=C3=A9').toString('utf8')).toBe('café');
  });
});

describe('the catcher over real SMTP', () => {
  it('keeps a message sent with the app transport as a file and an index entry, both parts readable', async () => {
    const { sendMail } = await import('@/lib/mail/transport');
    const subject = 'Prüfung — Rt 1.4 at Alder Camp';
    const long = 'A line long enough to be folded by the quoted-printable encoder of the composer, with ümlauts: ' + 'x'.repeat(120);
    const sent = await sendMail({ to: 'probe@marrowbend.example', subject, text: `Hello\n${long}\nend`, html: `<p>Hello <b>there</b> ${long}</p>` });
    expect(sent.accepted).toEqual(['probe@marrowbend.example']);
    const [m] = await mailTo('probe@marrowbend.example');
    expect(m).toBeDefined();
    // [calc] round trip: what nodemailer encoded, our reader decodes to the same strings.
    expect(m!.subject).toBe(subject);
    expect(m!.text).toBe(`Hello\n${long}\nend`);
    expect(m!.html).toContain(`<p>Hello <b>there</b> ${long}</p>`);
    const index = JSON.parse(readFileSync(path.join(TEST_DIR, 'mail', 'index.json'), 'utf8')) as Array<{ id: string; file: string }>;
    const entry = index.find((e) => e.id === m!.id)!;
    expect(existsSync(path.join(TEST_DIR, 'mail', entry.file))).toBe(true);
    expect(readFileSync(path.join(TEST_DIR, 'mail', entry.file), 'utf8')).toMatch(/multipart\/alternative/);
  });

  it('listens on loopback only', async () => {
    await expect(startCatcher({ dir: path.join(TEST_DIR, 'mail-x'), host: '0.0.0.0' })).rejects.toThrow(/loopback/);
  });

  it('turns a dead mail server into a 503 the client can read', async () => {
    const { sendMail } = await import('@/lib/mail/transport');
    const saved = process.env.SMTP_URL;
    const dead = await startCatcher({ dir: path.join(TEST_DIR, 'mail-dead'), quiet: true });
    await dead.close();
    process.env.SMTP_URL = dead.url;
    try {
      await expect(sendMail({ to: 'x@marrowbend.example', subject: 's', text: 't', html: '<p>t</p>' })).rejects.toMatchObject({ status: 503 });
    } finally {
      process.env.SMTP_URL = saved;
    }
  });
});

describe('/api/mail (sent mail, admins)', () => {
  it('lists and shows caught messages to admins only', async () => {
    const list = await import('@/app/api/mail/route');
    const one = await import('@/app/api/mail/[id]/route');
    const admin = await sessionCookie('admin@marrowbend.example');
    const coordinator = await sessionCookie('coordinator@marrowbend.example');
    const res = await call(list.GET as never, '/api/mail', { cookie: admin });
    expect(res.status).toBe(200);
    expect(res.body.messages.length).toBeGreaterThanOrEqual(1);
    const id = res.body.messages[0].id as string;
    const shown = await call(one.GET as never, `/api/mail/${id}`, { cookie: admin, params: { id } });
    expect(shown.status).toBe(200);
    expect(shown.body.message.text).toContain('Hello');
    expect((await call(list.GET as never, '/api/mail', { cookie: coordinator })).status).toBe(403);
    expect((await call(one.GET as never, `/api/mail/${id}`, { cookie: coordinator, params: { id } })).status).toBe(403);
    const bad = await call(one.GET as never, '/api/mail/..%2Fetc', { cookie: admin, params: { id: '../index' } });
    expect(bad.status).toBe(404);
  });
});
