import { expect, type Page } from '@playwright/test';

export const DEMO_PASSWORD = 'ebbcast-demo';
export const DEMO_OUTBREAK = '00000000-0000-4000-8000-00000000a001';

/** Signs in through the real sign-in page and next-auth credentials flow. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/signin');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByTestId('user-menu')).toBeVisible();
}
