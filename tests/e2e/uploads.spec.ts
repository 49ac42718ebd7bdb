import { test, expect } from '@playwright/test';
import { signIn, DEMO_OUTBREAK } from './helpers';
import { formatDay } from '../../lib/mail/format';

// [pub] PNG signature (RFC 2083 §3.1) followed by filler; the server reads the type from these bytes.
const PNG = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, ...new Array(64).fill(1)]);
const HTML = Buffer.from('<!doctype html><html><body>not a sheet</body></html>');

test.describe('tally-sheet uploads', () => {
  test('a coordinator attaches a sheet, a forged one is refused, an offline one waits and is sent on reconnect', async ({ page, context }, testInfo) => {
    await signIn(page, 'coordinator@marrowbend.example');
    await page.goto(`/sheets?outbreak=${DEMO_OUTBREAK}`);
    // The page opens on today (UTC). A retry (CI retries once) attaches to the day before, so the
    // sheets of a first attempt on the same server and database do not change what it counts.
    const day = new Date(Date.now() - testInfo.retry * 86_400_000).toISOString().slice(0, 10);
    if (testInfo.retry > 0) await page.getByLabel('Day').fill(day);
    const upload = page.getByTestId('tally-sheet-upload');
    const file = upload.locator('input[type=file]');
    // Enabled once the page is interactive (a file set before that would meet no handler).
    await expect(file).toBeEnabled();

    await file.setInputFiles({ name: 'sheet.png', mimeType: 'image/png', buffer: HTML });
    await expect(upload.getByRole('alert')).toContainText('This file is a web page or SVG although its name ends in .png, not a JPEG, PNG or PDF.');

    await file.setInputFiles({ name: 'alder-sheet.png', mimeType: 'image/png', buffer: PNG });
    await expect(upload.getByText('Sheet attached.')).toBeVisible();
    await expect(upload.getByTestId('tally-sheet-link')).toContainText('Sheet (image)');

    await context.setOffline(true);
    await file.setInputFiles({ name: 'offline-sheet.png', mimeType: 'image/png', buffer: PNG });
    await expect(upload.getByText(/kept on this device/)).toBeVisible();
    await expect(upload.getByTestId('tally-sheet-queued')).toContainText('offline-sheet.png — waiting to be sent');
    await page.screenshot({ path: '/tmp/ebbcast-sheet-offline.png', fullPage: true });
    await context.setOffline(false);
    await expect(upload.getByTestId('tally-sheet-queued')).toHaveCount(0);
    await expect(upload.getByTestId('tally-sheet-link')).toContainText('Sheet 2 (image)');

    await page.reload();
    const rows = page.getByTestId('sheets-table').getByRole('row').filter({ hasText: formatDay(day) });
    await expect(rows.getByRole('link', { name: /Sheet \(image\)/ })).toHaveCount(2);
    const href = await rows.getByRole('link', { name: /Sheet \(image\)/ }).first().getAttribute('href');
    const res = await page.request.get(href!);
    expect(res.headers()['content-type']).toBe('image/png');
    expect(Buffer.from(await res.body()).equals(PNG)).toBe(true);
  });
});
