import { test, expect, type Page } from '@playwright/test';
import { DEMO_OUTBREAK, signIn } from './helpers';

/** Types into a numeric box (select all, then type) so the screen sees each keystroke as a user's. */
async function setNumber(page: Page, testId: string, value: string) {
  const box = page.getByTestId(testId);
  await box.click();
  await box.fill(value);
  await box.blur();
}

const progressValue = async (page: Page) => Number(await page.getByTestId('ensemble-progress').getAttribute('aria-valuenow'));

test.describe('scenario screen', () => {
  test.beforeEach(async ({ page }) => {
    await signIn(page, 'field@marrowbend.example');
    await page.goto(`/scenarios?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('figures')).toBeVisible();
  });

  test('changing R0 changes the figures, recomputed in the worker', async ({ page }) => {
    await setNumber(page, 'R0', '1.8');
    await expect(page.getByTestId('fig-R0-value')).toHaveText('1.8');
    const peakBefore = await page.getByTestId('fig-peak-value').textContent();
    const finalBefore = await page.getByTestId('fig-final-value').textContent();
    await setNumber(page, 'R0', '3');
    await expect(page.getByTestId('fig-R0-value')).toHaveText('3');
    await expect(page.getByTestId('fig-R0')).toContainText('each case infects about 3 others');
    await expect(page.getByTestId('fig-peak-value')).not.toHaveText(peakBefore ?? '');
    await expect(page.getByTestId('fig-final-value')).not.toHaveText(finalBefore ?? '');
    // β follows R0 at the same infectious period (two-way): 3 / 3 days = 1 per day.
    await expect(page.getByTestId('beta')).toHaveValue('1');
    // [pub] herd-immunity threshold 1 − 1/R0 = 66.7 % (Anderson & May 1991; REFERENCES.md §1).
    await expect(page.getByTestId('fig-herd-value')).toHaveText('66.7%');
    await expect(page.getByTestId('compartment-chart').locator('canvas')).toBeVisible();
    await page.screenshot({ path: '/tmp/scenarios-1024.png', fullPage: true });
    await page.setViewportSize({ width: 800, height: 1280 });
    await page.waitForTimeout(300);
    await page.screenshot({ path: '/tmp/scenarios-800.png', fullPage: true });
  });

  test('an unsafe Euler step shows the message and "Use step" fixes it; the Euler-vs-RK4 overlay is drawn', async ({ page }) => {
    await page.getByTestId('method').selectOption('euler');
    await setNumber(page, 'step', '0.5');
    // β = 4 per day: [pub] REFERENCES.md §5, Euler needs h·β ≤ 1, so 0.25 day is the largest safe step.
    await setNumber(page, 'beta', '4');
    const msg = page.getByTestId('unsafe-step');
    await expect(msg).toBeVisible();
    await expect(msg).toContainText('largest safe step is 0.25 day');
    await page.screenshot({ path: '/tmp/scenarios-unsafe.png' });
    await page.getByTestId('use-safe-step').click();
    await expect(msg).toHaveCount(0);
    await expect(page.getByTestId('step')).toHaveValue('0.25');
    await expect(page.getByTestId('figures')).toBeVisible();

    // The overlay: both curves at the chosen step, and their largest difference in people.
    await page.getByTestId('method').selectOption('rk4');
    await setNumber(page, 'beta', '0.6');
    await setNumber(page, 'step', '1');
    const check = page.getByTestId('step-check');
    await expect(check.getByTestId('step-overlay-chart').locator('canvas')).toBeVisible();
    await expect(check.getByTestId('step-max-diff')).toContainText(/Largest difference: [\d,]+ people/);
    const big = await check.getByTestId('step-max-diff').textContent();
    await setNumber(page, 'step', '0.05');
    // Forward Euler is first order: a 20× smaller step gives a much smaller gap [pub: Hairer, Nørsett & Wanner; mem].
    await expect(check.getByTestId('step-max-diff')).not.toHaveText(big ?? '');
    const diff = (s: string | null) => Number((s ?? '').match(/Largest difference: ([\d,]+) people/)?.[1]?.replace(/,/g, ''));
    expect(diff(await check.getByTestId('step-max-diff').textContent())).toBeLessThan(diff(big));
    await check.scrollIntoViewIfNeeded();
    await page.screenshot({ path: '/tmp/scenarios-overlay.png' });
  });

  test('a 1,000-run ensemble shows a moving progress bar, can be cancelled, and runs again', async ({ page }) => {
    // A fine step and a year make each run slow enough to watch the bar.
    await setNumber(page, 'step', '0.005');
    await setNumber(page, 'days', '365');
    await setNumber(page, 'ens-runs', '1000');
    await page.getByTestId('ensemble-run').click();
    const bar = page.getByTestId('ensemble-progress');
    await expect(bar).toBeVisible();
    await expect.poll(() => progressValue(page), { timeout: 30_000 }).toBeGreaterThan(0);
    const first = await progressValue(page);
    await expect.poll(() => progressValue(page), { timeout: 30_000 }).toBeGreaterThan(first);
    await page.screenshot({ path: '/tmp/scenarios-ensemble-running.png' });
    await page.getByTestId('ensemble-progress-cancel').click();
    await expect(bar).toHaveCount(0);
    await expect(page.getByTestId('ensemble-cancelled')).toBeVisible();
    // The live chart lives in another worker: it still answers after the cancel.
    await setNumber(page, 'R0', '2.2');
    await expect(page.getByTestId('fig-R0-value')).toHaveText('2.2');
    // A new run works and finishes.
    await setNumber(page, 'step', '0.25');
    await page.getByTestId('ensemble-run').click();
    await expect(page.getByTestId('ensemble-result')).toBeVisible({ timeout: 60_000 });
    await expect(page.getByTestId('ensemble-chart').locator('canvas')).toBeVisible();
    await expect(page.getByTestId('ens-peak-day')).toContainText(/\d+–\d+/);
    await page.getByTestId('ensemble-result').scrollIntoViewIfNeeded();
    await page.screenshot({ path: '/tmp/scenarios-ensemble-done.png' });
  });

  test('a scenario is saved for the outbreak and listed', async ({ page }) => {
    await page.getByTestId('add-intervention').click();
    await expect(page.getByTestId('intervention-0')).toBeVisible();
    await setNumber(page, 'iv-0-cut', '40');
    await page.getByTestId('scenario-name').fill('Distancing from day 21');
    await page.getByTestId('scenario-save').click();
    await expect(page.getByText('Saved “Distancing from day 21”.')).toBeVisible();
    await expect(page.getByTestId('saved-scenario').filter({ hasText: 'Distancing from day 21' })).toContainText('1 intervention');
  });
});
