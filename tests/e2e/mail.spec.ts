import { test, expect } from '@playwright/test';
import { signIn } from './helpers';

test.describe('mail: invitations and password reset', () => {
  test('an admin invites a field officer; the message arrives in the catcher; the link sets a password; the new user signs in', async ({ page, browser }) => {
    await signIn(page, 'admin@marrowbend.example');
    await page.getByRole('button', { name: 'Invite by e-mail' }).click();
    const form = page.getByTestId('invite-form');
    await form.getByLabel('Their name').fill('Rosa Lindqvist');
    await form.getByLabel('Their e-mail address').fill('rosa@marrowbend.example');
    await form.getByLabel('Role').selectOption('field');
    await form.getByLabel(/North team/).check();
    await form.getByRole('button', { name: 'Send invitation' }).click();
    await expect(page.getByTestId('invite-message')).toContainText('Invitation sent to rosa@marrowbend.example');
    await expect(page.getByTestId('pending-invitations')).toContainText('rosa@marrowbend.example');
    await page.screenshot({ path: '/tmp/ebbcast-invite-admin.png', fullPage: true });

    // The catcher kept it; the admin reads it on /mail.
    await page.goto('/mail');
    await page.getByRole('link', { name: /You are invited to Ebbcast as field officer/ }).first().click();
    await expect(page.getByTestId('mail-to')).toHaveText('rosa@marrowbend.example');
    const text = (await page.getByTestId('mail-text').textContent()) ?? '';
    expect(text).toContain('Hello Rosa Lindqvist');
    expect(text).toContain('North team');
    await page.screenshot({ path: '/tmp/ebbcast-mail-page.png', fullPage: true });
    const link = /http:\/\/127\.0\.0\.1:\d+\/invite\?token=[A-Za-z0-9_-]{43}/.exec(text)?.[0];
    expect(link).toBeTruthy();

    const ctx = await browser.newContext();
    const p2 = await ctx.newPage();
    await p2.goto(link!);
    await expect(p2.getByTestId('link-email')).toHaveText('rosa@marrowbend.example');
    await p2.getByLabel('New password', { exact: true }).fill('short');
    await p2.getByLabel('New password again').fill('short');
    await p2.getByRole('button', { name: 'Activate my account' }).click();
    await expect(p2.getByText('At least 12 characters.', { exact: true })).toBeVisible();
    await p2.getByLabel('New password', { exact: true }).fill('lantern-otter-quarry');
    await p2.getByLabel('New password again').fill('lantern-otter-quarry');
    await p2.getByRole('button', { name: 'Activate my account' }).click();
    await expect(p2.getByTestId('password-set')).toBeVisible();
    await p2.screenshot({ path: '/tmp/ebbcast-invite-accepted.png' });
    await signIn(p2, 'rosa@marrowbend.example', 'lantern-otter-quarry');
    await expect(p2.getByTestId('user-role')).toHaveText('Field officer');
    await expect(p2).toHaveURL(/\/field/);

    // The same link a second time is refused with a clear message.
    const p3 = await ctx.newPage();
    await p3.goto(link!);
    await expect(p3.getByTestId('link-refused')).toContainText('already been used');
    await ctx.close();
  });

  test('"Forgot password?" answers the same for an unknown address, and a known one gets a working link', async ({ page, browser }) => {
    // An account of this test's own, so no other spec's demo sign-in is changed.
    const admin = await browser.newContext();
    const a = await admin.newPage();
    await signIn(a, 'admin@marrowbend.example');
    const made = await a.request.post('/api/users', {
      data: { email: 'reset.me@marrowbend.example', name: 'Rey Setter', role: 'supervisor', password: 'the-old-long-password', outbreakIds: ['00000000-0000-4000-8000-00000000a001'] },
    });
    expect(made.status()).toBe(200);
    await page.goto('/signin');
    await page.getByRole('link', { name: 'Forgot password?' }).click();
    await page.getByLabel('E-mail').fill('nobody-here@marrowbend.example');
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    const unknownAnswer = await page.getByTestId('forgot-done').textContent();
    await page.goto('/forgot');
    await page.getByLabel('E-mail').fill('reset.me@marrowbend.example');
    await page.getByRole('button', { name: 'Send me a reset link' }).click();
    await expect(page.getByTestId('forgot-done')).toHaveText(unknownAnswer ?? '');

    // Sent in the background: poll the admin's mail list until it is there.
    let id = '';
    await expect.poll(async () => {
      const res = await a.request.get('/api/mail?to=reset.me@marrowbend.example');
      const body = (await res.json()) as { messages: Array<{ id: string; subject: string }> };
      id = body.messages.find((m) => m.subject.includes('reset'))?.id ?? '';
      return id;
    }).not.toBe('');
    const none = (await (await a.request.get('/api/mail?to=nobody-here@marrowbend.example')).json()) as { messages: unknown[] };
    expect(none.messages).toHaveLength(0);
    const msg = (await (await a.request.get(`/api/mail/${id}`)).json()) as { message: { text: string } };
    const link = /http:\/\/127\.0\.0\.1:\d+\/reset\?token=[A-Za-z0-9_-]{43}/.exec(msg.message.text)?.[0];
    expect(link).toBeTruthy();
    await admin.close();

    await page.goto(link!);
    await page.getByLabel('New password', { exact: true }).fill('a-fresh-supervisor-pass');
    await page.getByLabel('New password again').fill('a-fresh-supervisor-pass');
    await page.getByRole('button', { name: 'Set the new password' }).click();
    await expect(page.getByTestId('password-set')).toBeVisible();
    await signIn(page, 'reset.me@marrowbend.example', 'a-fresh-supervisor-pass');
    await expect(page.getByTestId('user-role')).toHaveText('Supervisor');
  });
});
