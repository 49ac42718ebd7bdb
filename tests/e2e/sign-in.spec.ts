import { test, expect } from '@playwright/test';
import { signIn } from './helpers';

const EXPECTED: Record<string, { role: string; home: RegExp; nav: string[]; notNav: string[] }> = {
  'field@marrowbend.example': { role: 'Field officer', home: /\/field/, nav: ['Record tallies', 'Sync'], notNav: ['Merge desk', 'Users', 'Sync ledger'] },
  'field2@marrowbend.example': { role: 'Field officer', home: /\/field/, nav: ['Record tallies'], notNav: ['Merge desk'] },
  'coordinator@marrowbend.example': { role: 'Coordinator', home: /\/overview/, nav: ['Merge desk', 'Sitrep', 'Outbreaks & sites'], notNav: ['Users', 'Sync ledger'] },
  'supervisor@marrowbend.example': { role: 'Supervisor', home: /\/overview/, nav: ['Sync ledger', 'Sitrep'], notNav: ['Record tallies', 'Merge desk'] },
  'admin@marrowbend.example': { role: 'Administrator', home: /\/admin/, nav: ['Users', 'Sent mail'], notNav: ['Record tallies'] },
};

test.describe('sign-in and roles', () => {
  for (const [email, want] of Object.entries(EXPECTED)) {
    test(`${email} signs in and sees the ${want.role} navigation`, async ({ page }) => {
      await signIn(page, email);
      await expect(page).toHaveURL(want.home);
      await expect(page.getByTestId('user-role')).toHaveText(want.role);
      const nav = page.getByRole('navigation', { name: 'Main' });
      for (const label of want.nav) await expect(nav.getByRole('link', { name: label })).toBeVisible();
      for (const label of want.notNav) await expect(nav.getByRole('link', { name: label })).toHaveCount(0);
    });
  }

  test('a wrong password is refused with a clear message', async ({ page }) => {
    await page.goto('/signin');
    await page.getByLabel('E-mail').fill('field@marrowbend.example');
    await page.getByLabel('Password').fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByTestId('sign-in-error')).toContainText('do not match');
  });

  test('a signed-out visit to a desk screen goes to the sign-in page', async ({ page }) => {
    await page.goto('/admin');
    await expect(page).toHaveURL(/\/signin\?callbackUrl=/);
  });

  test('the landing page states the job and the cautions', async ({ page }) => {
    await page.goto('/');
    await expect(page.getByRole('heading', { name: 'Ebbcast', level: 1 })).toBeVisible();
    await expect(page.getByText('A model run is a scenario, not a prediction.')).toBeVisible();
  });

  test('the admin creates a user, who can sign in, then is deactivated', async ({ page, browser }) => {
    await signIn(page, 'admin@marrowbend.example');
    await page.getByLabel('Name').fill('Sam Field');
    await page.getByLabel('E-mail').fill('sam@marrowbend.example');
    await page.getByLabel('Password').fill('a-long-password-123');
    await page.getByLabel(/North team/).check();
    await page.getByRole('button', { name: 'Create user' }).click();
    await expect(page.getByText('sam@marrowbend.example created.')).toBeVisible();
    const other = await browser.newContext();
    const p2 = await other.newPage();
    await signIn(p2, 'sam@marrowbend.example', 'a-long-password-123');
    await expect(p2.getByTestId('user-role')).toHaveText('Field officer');
    await page.getByRole('button', { name: 'Deactivate sam@marrowbend.example' }).click();
    await expect(page.getByText('sam@marrowbend.example updated.')).toBeVisible();
    const me = await p2.request.get('/api/me');
    expect(me.status()).toBe(401);
    await other.close();
  });
});
