import { test, expect, type Page } from '@playwright/test';
import { DEMO_OUTBREAK, signIn } from './helpers';

/** The machine's calendar day, as the browser on it sees it (same clock, same time zone). */
const day = (offset = 0) => {
  const d = new Date();
  d.setDate(d.getDate() + offset);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
};

async function curveTotal(page: Page): Promise<number> {
  const text = await page.getByTestId('epi-curve-total').innerText();
  return Number(text.replace(/[^\d]/g, ''));
}

test.describe('tallies', () => {
  test('a field officer enters tallies for two sites on a tablet and sees the curve update', async ({ page }) => {
    await page.setViewportSize({ width: 800, height: 1280 });
    await signIn(page, 'field@marrowbend.example');
    await page.goto(`/tallies?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('epi-curve').locator('canvas')).toBeVisible();
    await expect(page.getByTestId('epi-curve-total')).toContainText('cases in total');
    const before = await curveTotal(page);
    expect(before).toBeGreaterThan(0);
    await page.screenshot({ path: '/tmp/tallies-curve-before.png', fullPage: true });

    await page.goto(`/entry?outbreak=${DEMO_OUTBREAK}`);
    const picker = page.getByTestId('site-picker');
    await picker.getByRole('button', { name: 'Alder Camp' }).click();
    await expect(page.getByLabel('Day')).toHaveValue(day());
    await expect(page.getByTestId('entry-status')).toContainText('No tally yet');
    const cases = page.getByLabel('New cases', { exact: true });
    // A bad value gets an inline, specific error and nothing is saved.
    await cases.fill('-3');
    await cases.press('Enter');
    await expect(page.getByText('Cannot be negative.')).toBeVisible();
    await page.getByRole('button', { name: 'New cases: one less' }).click();
    await expect(cases).toHaveValue('0');
    await page.getByRole('button', { name: 'New cases: one more' }).click();
    await page.getByRole('button', { name: 'New cases: one more' }).click();
    await expect(cases).toHaveValue('2');
    await cases.fill('12');
    await page.screenshot({ path: '/tmp/tallies-entry-form.png', fullPage: true });
    await page.getByRole('button', { name: 'Save and next site' }).click();
    await expect(page.getByTestId('entry-saved')).toContainText('Saved — Alder Camp');
    // Save and next site moved on to the next site of the team (sites in name order).
    await expect(picker.getByRole('button', { name: 'Hollin Crossing' })).toHaveAttribute('aria-pressed', 'true');
    await expect(page.getByTestId('entry-status')).toContainText('No tally yet for Hollin Crossing');

    // More cases than people at the site: the form warns and asks to confirm.
    await cases.fill('2000');
    await cases.press('Enter');
    await expect(page.getByRole('alertdialog', { name: 'Please check' })).toContainText("more than the site's population (1900)");
    await page.screenshot({ path: '/tmp/tallies-entry-warning.png', fullPage: true });
    await page.getByRole('button', { name: 'Change the count' }).click();
    await cases.fill('9');
    await cases.press('Enter');
    await expect(page.getByTestId('entry-saved')).toContainText('Saved — Hollin Crossing');
    await expect(picker.getByRole('button', { name: /Alder Camp/ })).toContainText('✓');

    // Opening the same site and day again loads the tally for editing.
    await picker.getByRole('button', { name: /Alder Camp/ }).click();
    await expect(page.getByTestId('entry-status')).toContainText('version 1');
    await expect(cases).toHaveValue('12');

    await page.goto(`/tallies?outbreak=${DEMO_OUTBREAK}`);
    await expect.poll(() => curveTotal(page)).toBe(before + 21);
    await expect(page.getByTestId('tally-table')).toContainText('Hollin Crossing');
    await page.screenshot({ path: '/tmp/tallies-curve-after.png', fullPage: true });
  });

  test('a coordinator imports a CSV with errors, reads the report, fixes the file and imports it', async ({ page }) => {
    await signIn(page, 'coordinator@marrowbend.example');
    await page.goto(`/tallies?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('epi-curve')).toBeVisible();
    const before = await curveTotal(page);
    await page.getByRole('tab', { name: 'Site-by-day grid' }).click();
    await expect(page.getByTestId('reporting-grid')).toContainText('Fennel Village');
    await page.screenshot({ path: '/tmp/tallies-grid.png', fullPage: true });

    await page.getByRole('tab', { name: 'Import CSV' }).click();
    const header = 'site,date,newCases,recoveries,deaths,admissions,note';
    const bad = [header,
      `Lakeshore Ward,${day()},-1,,,,`,
      `Nowhere Camp,${day()},2,,,,`,
      `Fennel Village,${day()},4,1,,,from the evening round`,
      `Lakeshore Ward,${day(5)},3,,,,`,
      `Fennel Village,14/02/2026,3,,,,`,
    ].join('\n');
    await page.getByLabel('CSV file').setInputFiles({ name: 'tallies.csv', mimeType: 'text/csv', buffer: Buffer.from(bad) });
    const report = page.getByTestId('import-report');
    await expect(page.getByTestId('import-summary')).toHaveText('5 rows: 1 ready to import, 4 with problems.');
    const issues = page.getByTestId('import-issues');
    await expect(issues.getByRole('row', { name: /^2 newCases -1 New cases cannot be negative/ })).toBeVisible();
    await expect(issues).toContainText('No site "Nowhere Camp" in this outbreak.');
    await expect(issues).toContainText('The date is after today');
    await expect(issues).toContainText('Write dates as YYYY-MM-DD');
    await page.screenshot({ path: '/tmp/tallies-import-report.png', fullPage: true });
    await expect(report.getByRole('button', { name: 'Import 1 valid row' })).toBeEnabled();

    // Fix the file instead of importing a part of it.
    await report.getByRole('button', { name: 'Cancel: import nothing' }).click();
    const fixed = [header,
      `Lakeshore Ward,${day()},1,,,,`,
      `Fennel Village,${day()},4,1,,,from the evening round`,
      // Hollin Crossing left yesterday unreported in the demo: the gap is filled now.
      `Hollin Crossing,${day(-1)},2,,,,`,
    ].join('\n');
    await page.getByLabel('CSV file').setInputFiles({ name: 'tallies-fixed.csv', mimeType: 'text/csv', buffer: Buffer.from(fixed) });
    await expect(page.getByTestId('import-summary')).toHaveText('3 rows: 3 ready to import, no problems.');
    await page.getByRole('button', { name: 'Import 3 valid rows' }).click();
    await expect(page.getByTestId('import-done')).toContainText('Imported 3 tallies');
    await page.screenshot({ path: '/tmp/tallies-import-done.png', fullPage: true });

    await page.getByRole('tab', { name: 'Table' }).click();
    await expect.poll(() => curveTotal(page)).toBe(before + 7);
    await expect(page.getByTestId('tally-table')).toContainText('from the evening round');
  });
});
