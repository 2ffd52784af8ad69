// Signing in as each demo role shows the navigation that role should see; a viewer is refused the admin
// page and its API; a signed-out visitor is sent to sign in.
import { describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { openBrowser, screenshot, signIn } from './browser';

const SECTIONS = ['Dashboard', 'Source models', 'Reduced models', 'Reviews', 'Controller projects'];

describe('navigation by role', () => {
  it.each(DEMO_PEOPLE.map((p) => [p.role, p] as const))('%s sees the sections of that role', async (role, person) => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, person.email, person.password);
      await page.waitForURL((url) => url.pathname === '/');
      await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Dashboard');
      const links = await page.getByRole('navigation', { name: 'Sections' }).getByRole('link').allTextContents();
      const labels = links.map((l) => l.replace(/^\d+/, '').trim());
      expect(labels).toEqual(role === 'admin' ? [...SECTIONS, 'Admin'] : SECTIONS);
      expect(await page.getByTestId('current-role').textContent()).toBe(role[0].toUpperCase() + role.slice(1));
      await screenshot(page, `dashboard-${role}`);
    } finally {
      await browser.close();
    }
  });

  it('refuses a viewer the admin page and the admin API', async () => {
    const viewer = DEMO_PEOPLE.find((p) => p.role === 'viewer')!;
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, viewer.email, viewer.password);
      await page.waitForURL((url) => url.pathname === '/');
      const response = await page.goto('/admin/people');
      expect(response?.status()).toBe(403);
      await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Not allowed for your role');
      expect(await page.getByText('Invite someone').count()).toBe(0);
      await screenshot(page, 'admin-refused-viewer');

      const api = await page.request.get('/api/admin/people');
      expect(api.status()).toBe(403);
      expect((await api.json()).error.code).toBe('forbidden');
      const invite = await page.request.post('/api/admin/people', {
        data: { email: 'viewer-made@quillmere.example', name: 'Viewer Made', role: 'admin' },
      });
      expect(invite.status()).toBe(403);
    } finally {
      await browser.close();
    }
  });

  it('sends a signed-out visitor to sign in, and back to the page afterwards', async () => {
    const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await page.goto('/reviews');
      expect(new URL(page.url()).pathname).toBe('/signin');
      expect(new URL(page.url()).searchParams.get('callbackUrl')).toBe('/reviews');
      await page.getByLabel('E-mail').fill(engineer.email);
      await page.getByLabel('Password').fill(engineer.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.waitForURL((url) => url.pathname === '/reviews');
      await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Reviews');
      await screenshot(page, 'reviews-empty-state');
    } finally {
      await browser.close();
    }
  });
});
