import { TEST_DIR, call, prepare, sessionCookie } from '../helpers/server';
import { existsSync, readdirSync } from 'node:fs';
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { DEMO_IDS } from '@/lib/db/demo';

let field: string, field2: string, coordinator: string, supervisor: string;
const UPLOADS = path.join(TEST_DIR, 'uploads');
const today = new Date().toISOString().slice(0, 10);

// [pub] file signatures: JPEG SOI FF D8 FF (ITU T.81), PNG 89 50 4E 47 0D 0A 1A 0A (RFC 2083 §3.1), PDF "%PDF-" (ISO 32000-1 §7.5.2).
const JPEG = Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46, 0x00, ...Array.from({ length: 200 }, (_, i) => i % 251), 0xff, 0xd9]);
const PNG = Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52, ...new Array(40).fill(7)]);
const PDF = new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
const HTML = new TextEncoder().encode('<!doctype html><html><script>alert(1)</script></html>');
const GIF = new TextEncoder().encode('GIF89a\x01\x00\x01\x00\x00\x00\x00;');

async function multipart(fields: Record<string, string>, file?: { name: string; bytes: Uint8Array; type?: string }) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  if (file) form.set('file', new Blob([new Uint8Array(file.bytes)], { type: file.type ?? 'application/octet-stream' }), file.name);
  const req = new Request('http://x/', { method: 'POST', body: form });
  return { rawBody: new Uint8Array(await req.arrayBuffer()), contentType: req.headers.get('content-type')! };
}

async function upload(cookie: string, file: { name: string; bytes: Uint8Array; type?: string }, extra: Partial<Record<'clientId' | 'siteId' | 'date', string>> = {}) {
  const { POST } = await import('@/app/api/uploads/route');
  const body = await multipart({ clientId: randomUUID(), siteId: DEMO_IDS.alderCamp, date: today, ...extra }, file);
  return call(POST as never, '/api/uploads', { method: 'POST', cookie, ...body });
}

const stored = () => (existsSync(UPLOADS) ? readdirSync(UPLOADS) : []);
const rows = async () => (await import('@/models')).TallySheet.count();

beforeAll(async () => {
  await prepare();
  [field, field2, coordinator, supervisor] = (await Promise.all(
    ['field', 'field2', 'coordinator', 'supervisor'].map((u) => sessionCookie(`${u}@marrowbend.example`)),
  )) as [string, string, string, string];
});

describe('tally-sheet uploads', () => {
  it('stores a JPEG under a random name with its metadata and a ledger row; the same bytes come back', async () => {
    const res = await upload(field, { name: 'Alder camp sheet.JPG', bytes: JPEG, type: 'image/jpeg' });
    expect(res.status).toBe(200);
    const sheet = res.body.sheet;
    expect(sheet).toMatchObject({ siteId: DEMO_IDS.alderCamp, date: today, mimeType: 'image/jpeg', size: JPEG.byteLength, originalName: 'Alder camp sheet.JPG' });
    const files = stored();
    expect(files).toHaveLength(1);
    expect(files[0]).toMatch(/^[a-f0-9]{32}\.jpg$/);
    const { LedgerEntry } = await import('@/models');
    const row = await LedgerEntry.findOne({ where: { kind: 'upload' }, order: [['id', 'DESC']] });
    expect(JSON.parse(row!.detail!)).toMatchObject({ sheetId: sheet.id, siteId: DEMO_IDS.alderCamp });

    const one = await import('@/app/api/uploads/[id]/route');
    for (const cookie of [field, coordinator, supervisor]) {
      const { NextRequest } = await import('next/server');
      const res2 = await one.GET(new NextRequest(`http://localhost:3000/api/uploads/${sheet.id}`, { headers: { cookie } }), { params: Promise.resolve({ id: sheet.id }) });
      expect(res2.status).toBe(200);
      expect(res2.headers.get('content-type')).toBe('image/jpeg');
      expect(res2.headers.get('x-content-type-options')).toBe('nosniff');
      expect(new Uint8Array(await res2.arrayBuffer())).toEqual(JPEG);
    }
    // Another team's field officer sees neither the file nor the list.
    expect((await call(one.GET as never, `/api/uploads/${sheet.id}`, { cookie: field2, params: { id: sheet.id } })).status).toBe(403);
    const list = await import('@/app/api/uploads/route');
    expect((await call(list.GET as never, `/api/uploads?siteId=${DEMO_IDS.alderCamp}`, { cookie: field2 })).status).toBe(403);
    const seen = await call(list.GET as never, `/api/uploads?siteId=${DEMO_IDS.alderCamp}&date=${today}`, { cookie: supervisor });
    expect(seen.body.sheets.map((s: { id: string }) => s.id)).toEqual([sheet.id]);
    expect(seen.body.sheets[0].uploadedByName).toBe('Ada Okafor');
  });

  it('accepts a PNG and a PDF by their bytes', async () => {
    expect((await upload(field, { name: 'scan.png', bytes: PNG })).body.sheet.mimeType).toBe('image/png');
    expect((await upload(coordinator, { name: 'scan.pdf', bytes: PDF, type: 'image/png' })).body.sheet.mimeType).toBe('application/pdf');
    expect((await upload(field, { name: 'no-extension', bytes: PNG })).body.sheet.mimeType).toBe('image/png');
  });

  it('refuses a forged extension (a web page named .jpg) with a clear message and stores nothing', async () => {
    const [files, count] = [stored().length, await rows()];
    const res = await upload(field, { name: 'sheet.jpg', bytes: HTML, type: 'image/jpeg' });
    expect(res.status).toBe(415);
    expect(res.body.error.code).toBe('unsupported_media_type');
    expect(res.body.error.message).toBe('This file is a web page or SVG although its name ends in .jpg, not a JPEG, PNG or PDF.');
    expect(stored().length).toBe(files);
    expect(await rows()).toBe(count);
  });

  it('refuses a PDF named .png: the name and the bytes disagree', async () => {
    const count = await rows();
    const res = await upload(field, { name: 'sheet.png', bytes: PDF, type: 'image/png' });
    expect(res.status).toBe(415);
    expect(res.body.error.message).toMatch(/ends in \.png but the file is a PDF scan/);
    expect(await rows()).toBe(count);
  });

  it('refuses a wrong type (GIF, even declared as JPEG) and stores nothing', async () => {
    const [files, count] = [stored().length, await rows()];
    const res = await upload(field, { name: 'sheet.gif', bytes: GIF, type: 'image/jpeg' });
    expect(res.status).toBe(415);
    expect(res.body.error.message).toBe('This file is a GIF image, not a JPEG, PNG or PDF.');
    expect(stored().length).toBe(files);
    expect(await rows()).toBe(count);
  });

  it('refuses a file over 5 MB with 413 and stores nothing; exactly 5 MB is accepted', async () => {
    const [files, count] = [stored().length, await rows()];
    const big = new Uint8Array(5 * 1024 * 1024 + 1);
    big.set(JPEG.subarray(0, 11));
    const res = await upload(field, { name: 'big.jpg', bytes: big });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload_too_large');
    expect(res.body.error.message).toMatch(/larger than 5 MB/);
    expect(stored().length).toBe(files);
    expect(await rows()).toBe(count);
    const exact = await upload(field, { name: 'exact.jpg', bytes: big.subarray(0, 5 * 1024 * 1024) });
    expect(exact.status).toBe(200);
  });

  it('refuses a body that is not a form upload, a missing file and a bad day, with field messages', async () => {
    const { POST } = await import('@/app/api/uploads/route');
    const json = await call(POST as never, '/api/uploads', { method: 'POST', cookie: field, body: { siteId: DEMO_IDS.alderCamp } });
    expect(json.status).toBe(415);
    const nofile = await call(POST as never, '/api/uploads', { method: 'POST', cookie: field, ...(await multipart({ clientId: randomUUID(), siteId: DEMO_IDS.alderCamp, date: today })) });
    expect(nofile.status).toBe(400);
    expect(nofile.body.error.fields.file).toBe('Required.');
    const badDay = await upload(field, { name: 'a.jpg', bytes: JPEG }, { date: '2026-02-30' });
    expect(badDay.status).toBe(400);
    expect(badDay.body.error.fields.date).toBeDefined();
  });

  it('stores a retried upload (same client id) once', async () => {
    const clientId = randomUUID();
    const count = await rows();
    const a = await upload(field, { name: 'retry.jpg', bytes: JPEG }, { clientId });
    const b = await upload(field, { name: 'retry.jpg', bytes: JPEG }, { clientId });
    expect(a.status).toBe(200);
    expect(b.body.duplicate).toBe(true);
    expect(b.body.sheet.id).toBe(a.body.sheet.id);
    expect(await rows()).toBe(count + 1);
  });

  it('lets supervisors read but not upload, and field officers upload only to their own sites', async () => {
    expect((await upload(supervisor, { name: 'a.jpg', bytes: JPEG })).status).toBe(403);
    expect((await upload(field2, { name: 'a.jpg', bytes: JPEG })).status).toBe(403);
    expect((await upload(field2, { name: 'a.jpg', bytes: JPEG }, { siteId: DEMO_IDS.lakeshoreWard })).status).toBe(200);
  });
});
