import { test, expect } from '@playwright/test';
import { execFileSync } from 'node:child_process';
import { existsSync, writeFileSync } from 'node:fs';
import { signIn, DEMO_OUTBREAK } from './helpers';

const KEYS = ['cutoff', 'cases', 'week', 'growth', 'doubling', 'rt', 'peak'] as const;

test.describe('sitrep', () => {
  test('a coordinator sends the sitrep; the message arrives with the figures the page shows', async ({ page, browser }) => {
    await signIn(page, 'coordinator@marrowbend.example');
    await page.goto(`/sitrep?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByRole('heading', { name: 'Marrow Bend ILI', level: 1 })).toBeVisible();
    await expect(page.getByTestId('chart-curve')).toBeVisible();
    await expect(page.getByTestId('chart-forecast')).toBeVisible();
    await expect(page.getByText('A model run is a scenario, not a prediction.')).toBeVisible();
    const figures: Record<string, { label: string; value: string }> = {};
    for (const k of KEYS) {
      const box = page.getByTestId(`fig-${k}`);
      const label = (await box.locator('p').first().textContent())!.trim();
      const value = (await page.getByTestId(`fig-${k}-value`).textContent())!.trim();
      figures[k] = { label, value };
    }
    await page.screenshot({ path: '/tmp/ebbcast-sitrep-screen.png', fullPage: true });
    await page.getByRole('button', { name: 'Send to coordinators' }).click();
    await expect(page.getByTestId('sitrep-send-message')).toContainText('Sent to 1 coordinator: coordinator@marrowbend.example');

    const ctx = await browser.newContext();
    const admin = await ctx.newPage();
    await signIn(admin, 'admin@marrowbend.example');
    await admin.goto('/mail');
    await admin.getByRole('link', { name: /^Sitrep Marrow Bend ILI/ }).first().click();
    const text = (await admin.getByTestId('mail-text').textContent()) ?? '';
    for (const k of KEYS) expect(text, k).toContain(`${figures[k]!.label}: ${figures[k]!.value}`);
    expect(text).toContain(`/sitrep?outbreak=${DEMO_OUTBREAK}`);
    await admin.screenshot({ path: '/tmp/ebbcast-sitrep-mail.png', fullPage: true });
    await ctx.close();
  });

  test('the print view renders on A4', async ({ page }) => {
    await signIn(page, 'supervisor@marrowbend.example');
    await page.goto(`/sitrep?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('chart-beds')).toBeVisible();
    // A supervisor reads the sitrep but cannot send it.
    await expect(page.getByRole('button', { name: 'Send to coordinators' })).toHaveCount(0);
    await page.emulateMedia({ media: 'print' });
    await expect(page.getByRole('navigation', { name: 'Main' })).toBeHidden();
    await expect(page.getByRole('button', { name: 'Print (A4)' })).toBeHidden();
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    const file = '/tmp/ebbcast-sitrep.pdf';
    writeFileSync(file, pdf);
    // [pub] ISO 32000-1 §7.5.2: a PDF file starts with "%PDF-"; pages are /Type /Page objects.
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
    expect(pages).toBeGreaterThanOrEqual(2);
    expect(pages).toBeLessThanOrEqual(6);
    if (existsSync('/usr/bin/pdfinfo')) {
      const info = execFileSync('pdfinfo', [file]).toString();
      // [pub] ISO 216: A4 is 210 × 297 mm = 595.28 × 841.89 pt.
      expect(info).toMatch(/Page size:\s+595\.\d+ x 841\.\d+ pts \(A4\)/);
    }
    // No pdftoppm here: look at the print layout itself at A4 width (210 mm ≈ 794 CSS px).
    await page.setViewportSize({ width: 794, height: 1123 });
    await page.screenshot({ path: '/tmp/ebbcast-sitrep-print.png', fullPage: true });
    if (existsSync('/usr/bin/pdftoppm')) {
      execFileSync('pdftoppm', ['-png', '-r', '60', '-f', '1', '-l', '2', file, '/tmp/ebbcast-sitrep-page']);
    }
  });
});
