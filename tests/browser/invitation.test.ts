// The invitation round trip through the built app: an admin invites someone, the mail shows up on
// Admin › Mail, its link sets a password, and that password then signs in. The link works only once.
import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { openBrowser, screenshot, signIn } from './browser';

describe('invitation by e-mail', () => {
  it('mails a link that sets a password which then signs in', async () => {
    const admin = DEMO_PEOPLE.find((p) => p.role === 'admin')!;
    const email = `new.engineer-${randomUUID().slice(0, 8)}@quillmere.example`;
    const password = 'firing curve 1180 C';
    let link = '';

    const adminBrowser = await openBrowser();
    try {
      const { page } = adminBrowser;
      await signIn(page, admin.email, admin.password);
      await page.waitForURL((url) => url.pathname === '/');
      await page.goto('/admin/people');
      const form = page.getByRole('region', { name: 'Invite someone' });
      await form.getByLabel('Name').fill('Noor Castellan');
      await form.getByLabel('E-mail').fill(email);
      await form.getByLabel('Role').selectOption('engineer');
      await form.getByRole('button', { name: 'Send invitation' }).click();
      await expect.poll(() => page.getByRole('status').textContent()).toBe(`Invitation sent to ${email}.`);
      await expect.poll(() => page.locator(`[data-testid="person-row"][data-email="${email}"]`).count()).toBe(1);
      expect(await page.locator(`[data-testid="person-row"][data-email="${email}"]`).textContent()).toContain('invited');
      await screenshot(page, 'people-after-invite');

      await page.goto('/admin/mail');
      const mail = page.locator(`[data-testid="mail-message"][data-to="${email}"]`);
      await expect.poll(() => mail.count()).toBe(1);
      expect(await mail.textContent()).toContain('You are invited to Modeshelf');
      link = (await mail.getByRole('link').first().getAttribute('href')) ?? '';
      expect(link).toMatch(/\/invite\/[A-Za-z0-9_-]{43}$/);
      await screenshot(page, 'mail-invitation');
    } finally {
      await adminBrowser.close();
    }

    const invitee = await openBrowser();
    try {
      const { page } = invitee;
      await page.goto(link);
      await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Accept your invitation');
      await page.getByLabel('New password').fill(password);
      await page.getByLabel('Repeat it').fill(password);
      await page.getByRole('button', { name: 'Set password and continue' }).click();
      await page.waitForURL((url) => url.pathname === '/');
      await expect.poll(() => page.getByTestId('title-block').textContent()).toContain('Noor Castellan');
      expect(await page.getByTestId('current-role').textContent()).toBe('Engineer');
      await screenshot(page, 'invitee-dashboard');

      // Sign out, then in again with the chosen password.
      await page.goto('/signout');
      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.waitForURL((url) => url.pathname === '/signin');
      await signIn(page, email, password);
      await page.waitForURL((url) => url.pathname === '/');
      await expect.poll(() => page.getByTestId('title-block').textContent()).toContain('Noor Castellan');

      // The link was spent.
      await page.goto(link);
      await expect.poll(() => page.getByText('This link has already been used; each link works once.').count()).toBe(1);
    } finally {
      await invitee.close();
    }
  });
});
