import { test, expect, type BrowserContext, type Page } from '@playwright/test';
import { DEMO_OUTBREAK, signIn } from './helpers';

/**
 * Offline-first in a real browser with the service worker active (SYNC.md, "Offline screens" and
 * "What tests must show"): the app opens from the cache, records tallies and runs a forecast
 * without a network, and everything reaches the server once the network is back.
 */

const day = (offset = 0) => {
  const d = new Date();
  d.setDate(d.getDate() + offset);
  return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
};

/** Waits until the service worker controls the page and its precache is complete (it is then active). */
async function serviceWorkerReady(page: Page) {
  await page.waitForFunction(async () => {
    const reg = await navigator.serviceWorker.ready;
    return Boolean(reg.active && navigator.serviceWorker.controller);
  }, null, { timeout: 60_000 });
}

/** Waits until the device has finished a sync (the header says when). */
async function synced(page: Page) {
  await expect(page.getByTestId('last-sync')).toContainText('synced just now', { timeout: 30_000 });
}

async function outbox(page: Page): Promise<number> {
  return Number((await page.getByTestId('outbox-size').innerText()).replace(/[^\d]/g, ''));
}

async function record(page: Page, site: string, cases: string) {
  const picker = page.getByTestId('site-picker');
  await picker.getByRole('button', { name: new RegExp(`^${site}`) }).click();
  await expect(picker.getByRole('button', { name: new RegExp(`^${site}`) })).toHaveAttribute('aria-pressed', 'true');
  await page.getByLabel('New cases', { exact: true }).fill(cases);
  await page.getByRole('button', { name: /^Save( changes)?$/ }).click();
  const check = page.getByRole('alertdialog', { name: 'Please check' });
  if (await check.isVisible().catch(() => false)) await check.getByRole('button', { name: 'Save anyway' }).click();
  await expect(page.getByTestId('entry-saved')).toContainText(`Saved — ${site}`);
}

async function fieldDevice(context: BrowserContext, email: string): Promise<Page> {
  const page = await context.newPage();
  await signIn(page, email);
  await page.goto(`/field?outbreak=${DEMO_OUTBREAK}`);
  await serviceWorkerReady(page);
  await synced(page);
  return page;
}

test.describe('offline first', () => {
  test('a field officer opens the app offline from the cache, records three tallies and runs a forecast; after reconnecting the coordinator sees them', async ({ browser }) => {
    test.setTimeout(240_000);
    const context = await browser.newContext();
    const page = await fieldDevice(context, 'field@marrowbend.example');

    await context.setOffline(true);
    await page.reload();
    await expect(page.getByTestId('online-state')).toHaveText('Offline');
    await expect(page.getByRole('heading', { name: 'Marrow Bend ILI' })).toBeVisible();
    await page.screenshot({ path: '/tmp/offline-field-home.png', fullPage: true });

    await page.goto(`/entry?outbreak=${DEMO_OUTBREAK}`);
    await expect(page.getByTestId('online-state')).toHaveText('Offline');
    // Two days back (other specs record today and yesterday on the same demo server).
    await page.getByRole('textbox', { name: 'Day' }).fill(day(-2));
    await record(page, 'Alder Camp', '14');
    await record(page, 'Northgate School', '6');
    await record(page, 'Hollin Crossing', '3');
    await expect.poll(() => outbox(page)).toBe(3);
    await page.screenshot({ path: '/tmp/offline-entry-three.png', fullPage: true });

    // A reload while offline keeps them (IndexedDB, not memory).
    await page.reload();
    await expect.poll(() => outbox(page)).toBe(3);

    // The forecast runs in the worker from local tallies, offline.
    await page.goto(`/forecast?outbreak=${DEMO_OUTBREAK}`);
    await page.getByTestId('fit-run').click();
    await expect(page.getByTestId('fit-result')).toBeVisible({ timeout: 90_000 });
    // uPlot is a chunk loaded with the first chart: offline it must come from the precache.
    await expect(page.getByTestId('fit-chart').locator('canvas')).toBeVisible();
    await page.getByTestId('forecast-run').click();
    await expect(page.getByTestId('forecast-result')).toBeVisible({ timeout: 120_000 });
    await expect(page.getByTestId('fc-peak-day')).toContainText(/day \d+/);
    await page.screenshot({ path: '/tmp/offline-forecast.png', fullPage: true });

    await page.goto('/sync');
    await expect(page.getByTestId('outbox-table')).toContainText(`Alder Camp, ${day(-2)}: 14 new cases`);
    await page.screenshot({ path: '/tmp/offline-sync-page.png', fullPage: true });

    // Back online: the sync runs (on reconnect, or by hand) and the outbox empties.
    await context.setOffline(false);
    await expect(page.getByTestId('online-state')).toHaveText('Online');
    await page.getByTestId('sync-now').click({ trial: false }).catch(() => undefined);
    await expect.poll(() => outbox(page), { timeout: 30_000 }).toBe(0);
    await expect(page.getByTestId('outbox-empty')).toBeVisible();
    await expect(page.getByTestId('sync-results')).toContainText('Applied');
    await page.screenshot({ path: '/tmp/online-sync-done.png', fullPage: true });

    const coord = await browser.newContext();
    const cp = await coord.newPage();
    await signIn(cp, 'coordinator@marrowbend.example');
    await cp.goto(`/tallies?outbreak=${DEMO_OUTBREAK}`);
    const table = cp.getByTestId('tally-table');
    await expect(table).toBeVisible({ timeout: 30_000 });
    for (const [site, cases] of [['Alder Camp', '14'], ['Northgate School', '6'], ['Hollin Crossing', '3']] as const) {
      await expect(table.getByRole('row').filter({ hasText: site }).filter({ hasText: day(-2) }).first()).toContainText(cases);
    }
    await cp.screenshot({ path: '/tmp/coordinator-sees-tallies.png', fullPage: true });
    await coord.close();
    await context.close();
  });

  test('two devices record the same site and day offline; the conflict goes to the merge desk, is settled, and the settlement reaches the ledger and both devices', async ({ browser }) => {
    test.setTimeout(240_000);
    const ctxA = await browser.newContext();
    const ctxB = await browser.newContext();
    const a = await fieldDevice(ctxA, 'field@marrowbend.example');
    const b = await fieldDevice(ctxB, 'coordinator@marrowbend.example');
    const date = day(-3);

    await ctxA.setOffline(true);
    await ctxB.setOffline(true);
    for (const [p, n] of [[a, '21'], [b, '8']] as const) {
      await p.goto(`/entry?outbreak=${DEMO_OUTBREAK}`);
      await p.getByRole('textbox', { name: 'Day' }).fill(date);
      await record(p, 'Alder Camp', n);
    }
    await ctxA.setOffline(false);
    await expect.poll(() => outbox(a), { timeout: 30_000 }).toBe(0);
    await ctxB.setOffline(false);
    await expect.poll(() => outbox(b), { timeout: 30_000 }).toBe(0);
    await b.goto('/sync');
    await expect(b.getByTestId('sync-results')).toContainText('Sent to the merge desk');

    // The coordinator's desk: both values side by side, with who and which device.
    await b.goto(`/merge?outbreak=${DEMO_OUTBREAK}`);
    const card = b.getByTestId('conflict-card').filter({ hasText: date }).first();
    await expect(card).toBeVisible();
    await expect(card.getByTestId('conflict-current')).toContainText('21');
    await expect(card.getByTestId('conflict-incoming')).toContainText('8');
    await expect(card).toContainText('Ada Okafor');
    await expect(card).toContainText('Mira Haldane');
    await b.screenshot({ path: '/tmp/merge-desk-conflict.png', fullPage: true });
    await card.getByLabel('Add them up').check();
    await card.getByTestId('settle').click();
    await expect(card.getByText('Say why')).toBeVisible(); // a reason is required
    await card.getByRole('textbox').fill('Both devices counted different patients at the camp');
    await card.getByTestId('settle').click();
    await expect(b.getByText(/^Settled: Alder Camp/)).toBeVisible();
    await b.screenshot({ path: '/tmp/merge-desk-settled.png', fullPage: true });

    await b.goto('/ledger?kind=settlement');
    await expect(b.getByTestId('ledger-table').locator('tr[data-kind="settlement"]').first()).toContainText('Both devices counted');
    await b.getByTestId('verify-ledger').click();
    await expect(b.getByTestId('verify-result')).toContainText('Chain intact');
    await b.screenshot({ path: '/tmp/ledger-settlement.png', fullPage: true });

    // Both devices pull the settled version (21 + 8 = 29).
    for (const p of [a, b]) {
      await p.goto('/sync');
      await p.getByTestId('sync-now').click();
      await expect(p.getByTestId('sync-report')).toContainText('changes received');
      await p.goto(`/tallies?outbreak=${DEMO_OUTBREAK}`);
      await expect(p.getByTestId('tally-table').getByRole('row').filter({ hasText: 'Alder Camp' }).filter({ hasText: date }).first()).toContainText('29');
    }
    await a.screenshot({ path: '/tmp/device-a-settled.png', fullPage: true });
    await ctxA.close();
    await ctxB.close();
  });

  test('every field shell opens offline after one online visit: goto, links, a link without prefetch, a record by id, reload', async ({ browser }) => {
    test.setTimeout(180_000);
    const context = await browser.newContext();
    const page = await context.newPage();
    await signIn(page, 'field@marrowbend.example'); // the sign-in lands on the start page (/field): the one visit
    await serviceWorkerReady(page);
    await synced(page);
    await context.setOffline(true);
    for (const path of ['/field', '/entry', '/tallies', '/scenarios', '/forecast', '/overview', '/sync', '/offline']) {
      await page.goto(`${path}?outbreak=${DEMO_OUTBREAK}`);
      await expect(page.locator('body')).not.toContainText('ERR_INTERNET_DISCONNECTED');
      if (path !== '/offline') await expect(page.getByTestId('online-state')).toHaveText('Offline');
    }
    // A record addressed by id in the query is served by its shell.
    await page.goto(`/tallies?outbreak=${DEMO_OUTBREAK}&site=00000000-0000-4000-8000-00000000c001`);
    await expect(page.getByTestId('online-state')).toHaveText('Offline');
    // Links of the navigation, and the status link (prefetch={false}).
    const nav = page.getByRole('navigation', { name: 'Main' });
    await nav.getByRole('link', { name: 'Record tallies' }).click();
    await expect(page).toHaveURL(/\/entry/);
    await expect(page.getByTestId('site-picker')).toBeVisible();
    await nav.getByRole('link', { name: 'Scenarios' }).click();
    await expect(page).toHaveURL(/\/scenarios/);
    await page.getByTestId('status-indicator').click();
    await expect(page).toHaveURL(/\/sync/);
    await expect(page.getByRole('heading', { name: 'Sync' })).toBeVisible();
    await page.reload();
    await expect(page.getByRole('heading', { name: 'Sync' })).toBeVisible();
    // A desk screen says it needs a network instead of failing.
    await page.goto('/merge');
    await expect(page.getByRole('heading', { name: 'This page needs a network' })).toBeVisible();
    await page.screenshot({ path: '/tmp/offline-desk-fallback.png', fullPage: true });
    // It leads to every field screen, the forecast among them.
    await page.getByRole('link', { name: 'Forecast' }).click();
    await expect(page).toHaveURL(/\/forecast/);
    await expect(page.getByTestId('online-state')).toHaveText('Offline');
    await context.setOffline(false);
    await context.close();
  });

  test('the manifest and icons make the app installable', async ({ page }) => {
    const res = await page.request.get('/manifest.webmanifest');
    expect(res.ok()).toBe(true);
    const m = await res.json();
    expect(m.display).toBe('standalone');
    expect(m.theme_color).toBe('#1F6F78');
    for (const icon of m.icons as { src: string; sizes: string; purpose: string }[]) {
      const r = await page.request.get(icon.src);
      expect(r.ok(), icon.src).toBe(true);
      expect(r.headers()['content-type']).toContain('image/png');
      const body = await r.body();
      // PNG signature and the declared size in the IHDR chunk.
      expect(body.subarray(1, 4).toString('ascii')).toBe('PNG');
      const side = Number(icon.sizes.split('x')[0]);
      expect(body.readUInt32BE(16)).toBe(side);
      expect(body.readUInt32BE(20)).toBe(side);
    }
    expect((m.icons as { purpose: string }[]).some((i) => i.purpose === 'maskable')).toBe(true);
  });
});
