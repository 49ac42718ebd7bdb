import { test, expect, type Page } from '@playwright/test';
import { DEMO_OUTBREAK, signIn } from './helpers';

async function setNumber(page: Page, testId: string, value: string) {
  const box = page.getByTestId(testId);
  await box.click();
  await box.fill(value);
  await box.blur();
}

const progressValue = async (page: Page) => Number(await page.getByTestId('forecast-progress').getAttribute('aria-valuenow'));

test.describe('from the overview: fit, forecast, compare', () => {
  test('a coordinator fits the demo tallies, forecasts with bands and a progress bar, publishes, and compares two scenarios', async ({ page }) => {
    test.setTimeout(180_000);
    await signIn(page, 'coordinator@marrowbend.example');
    await page.goto(`/overview?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('ov-cases')).toBeVisible();
    await expect(page.getByTestId('ov-cases-value')).toHaveText(/^[\d,]+$/);
    await expect(page.getByTestId('ov-rt')).toBeVisible();
    await expect(page.getByText('A model run is a scenario, not a prediction.').first()).toBeVisible();
    await page.getByTestId('overview-to-forecast').click();
    await expect(page).toHaveURL(/\/forecast\?outbreak=/);

    // Early growth and Rt from the tallies.
    await expect(page.getByTestId('growth-r')).toContainText(/per day \(/);
    await expect(page.getByTestId('growth-doubling')).toContainText('days');
    await expect(page.getByTestId('rt-chart').locator('canvas')).toBeVisible();

    // The fit, in the worker: parameters with intervals, the observed tallies over the fitted curve, residuals.
    await page.getByTestId('fit-run').click();
    await expect(page.getByTestId('fit-result')).toBeVisible({ timeout: 60_000 });
    await expect(page.getByTestId('fit-R0')).toContainText(/\d.*–.*\d/);
    await expect(page.getByTestId('fit-beta')).toBeVisible();
    await expect(page.getByTestId('fit-I0')).toBeVisible();
    await expect(page.getByTestId('fit-chart').locator('canvas')).toBeVisible();
    await expect(page.getByTestId('residual-chart').locator('canvas')).toBeVisible();
    await page.getByTestId('fit-result').scrollIntoViewIfNeeded();
    await page.screenshot({ path: '/tmp/forecast-fit.png' });

    // The forecast: a fine step makes the 1,000 runs slow enough to watch the bar move.
    await setNumber(page, 'fc-step', '0.002');
    await setNumber(page, 'fc-runs', '1000');
    await page.getByTestId('forecast-run').click();
    await expect(page.getByTestId('forecast-progress')).toBeVisible();
    await expect.poll(() => progressValue(page), { timeout: 60_000 }).toBeGreaterThan(0);
    const first = await progressValue(page);
    await expect.poll(() => progressValue(page), { timeout: 60_000 }).toBeGreaterThan(first);
    await expect(page.getByTestId('forecast-result')).toBeVisible({ timeout: 120_000 });
    await expect(page.getByTestId('forecast-progress')).toHaveCount(0);
    for (const id of ['forecast-incidence-chart', 'forecast-prevalence-chart', 'forecast-beds-chart']) {
      await expect(page.getByTestId(id).locator('canvas')).toBeVisible();
    }
    await expect(page.getByTestId('fc-peak-day')).toContainText(/day \d+/);
    await expect(page.getByTestId('fc-beds-exceeded')).toBeVisible();
    await page.getByTestId('forecast-result').scrollIntoViewIfNeeded();
    await page.screenshot({ path: '/tmp/forecast-bands.png', fullPage: true });

    // Save the baseline, then the same with an intervention published as the official forecast.
    await page.getByTestId('fc-name').fill('Fit baseline');
    await page.getByTestId('fc-save').click();
    await expect(page.getByText('Saved “Fit baseline”.')).toBeVisible();
    await setNumber(page, 'fc-step', '0.5');
    await page.getByTestId('fc-with-cut').check();
    await setNumber(page, 'fc-cut', '40');
    await page.getByTestId('forecast-run').click();
    await expect(page.getByTestId('forecast-progress')).toHaveCount(0, { timeout: 60_000 });
    await expect(page.getByTestId('forecast-result')).toBeVisible();
    await page.getByTestId('fc-name').fill('Fit with 40% distancing');
    await page.getByTestId('fc-publish').click();
    await expect(page.getByText('Published “Fit with 40% distancing” as the official forecast.')).toBeVisible();

    // Compare the two on one chart and in a table.
    const compare = page.getByTestId('compare');
    await compare.scrollIntoViewIfNeeded();
    for (const name of ['Fit baseline', 'Fit with 40% distancing']) {
      const box = compare.getByTestId('compare-choice').locator('xpath=..').filter({ hasText: name }).getByRole('checkbox');
      await box.check();
    }
    await compare.getByTestId('compare-run').click();
    await expect(compare.getByTestId('compare-result')).toBeVisible({ timeout: 60_000 });
    await expect(compare.getByTestId('compare-chart').locator('canvas')).toBeVisible();
    const rows = compare.getByTestId('compare-row');
    await expect(rows.filter({ hasText: 'Fit baseline' })).toHaveCount(1);
    await expect(rows.filter({ hasText: 'Fit with 40% distancing' })).toHaveCount(1);
    // Cutting contacts from the day after the data lowers the final size (it may come after the peak, so the peak can stay).
    const cell = async (name: string, col: number) =>
      Number((await rows.filter({ hasText: name }).locator('td').nth(col).textContent())?.match(/^[\d,]+/)?.[0]?.replace(/,/g, ''));
    expect(await cell('Fit with 40% distancing', 3)).toBeLessThan(await cell('Fit baseline', 3));
    expect(await cell('Fit with 40% distancing', 2)).toBeLessThanOrEqual(await cell('Fit baseline', 2));
    await compare.scrollIntoViewIfNeeded();
    await page.screenshot({ path: '/tmp/forecast-compare.png' });

    // Back on the overview the official forecast is shown with its ranges.
    await page.goto(`/overview?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByRole('heading', { name: 'Official forecast' })).toBeVisible();
    await expect(page.getByTestId('ov-peak')).toContainText(/in 90% of runs between day \d+ and day \d+/);
    await expect(page.getByTestId('ov-beds')).toBeVisible();
    await page.screenshot({ path: '/tmp/overview-1024.png', fullPage: true });
    await page.setViewportSize({ width: 800, height: 1280 });
    await page.waitForTimeout(300);
    await page.screenshot({ path: '/tmp/overview-800.png', fullPage: true });
    await page.goto(`/forecast?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('growth-r')).toBeVisible();
    await page.screenshot({ path: '/tmp/forecast-800.png', fullPage: true });
  });

  test('a field officer sees no publish button', async ({ page }) => {
    await signIn(page, 'field@marrowbend.example');
    await page.goto(`/forecast?outbreak=${DEMO_OUTBREAK}`);
    await page.getByTestId('fit-run').click();
    await expect(page.getByTestId('fit-result')).toBeVisible({ timeout: 60_000 });
    await page.getByTestId('forecast-run').click();
    await expect(page.getByTestId('forecast-result')).toBeVisible({ timeout: 60_000 });
    await expect(page.getByTestId('fc-save')).toBeVisible();
    await expect(page.getByTestId('fc-publish')).toHaveCount(0);
  });
});
