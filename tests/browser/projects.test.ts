// A controller project end to end against the built app: an engineer creates a project, pins a reduced
// model, makes a project token, pulls the model with it through the API, revokes it, and the next pull is
// refused. The approved reduced model is put on the shelf directly (tests/integration/fixtures/projects.ts).
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb } from '@/lib/db';
import { matricesSha256 } from '@/lib/checksums';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { addVersion, makeProjectShelf, stiffTestModel, type ProjectShelf } from '../integration/fixtures/projects';
import { BASE_URL, openBrowser, screenshot, signIn } from './browser';

const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;
const viewer = DEMO_PEOPLE.find((p) => p.role === 'viewer')!;
const MODEL = stiffTestModel(4, 2, 2, 3);
let shelf: ProjectShelf;

beforeAll(async () => {
  shelf = await makeProjectShelf('browser');
  await addVersion(shelf, { matrices: MODEL, hInfinityErrorRelative: 4e-3 });
});

afterAll(async () => {
  await closeDb();
});

async function pullModel(slug: string, token: string) {
  const response = await fetch(`${BASE_URL}/api/v1/projects/${slug}/models/${shelf.reducedModel.slug}`, {
    headers: { authorization: `Bearer ${token}` },
  });
  return { status: response.status, body: await response.json() };
}

describe('controller projects in the browser', () => {
  const slug = `browser-ctl-${randomUUID().slice(0, 8)}`;

  it('create a project, pin a model, make a token, pull with it, revoke it, and the next pull is refused', async () => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');
      await page.goto('/projects');
      await screenshot(page, 'projects-list');
      const form = page.getByRole('region', { name: 'New controller project' });
      await form.getByLabel('Name').fill('Browser zone controller');
      await form.getByLabel('Slug (optional)').fill(slug);
      await form.getByLabel('Sample time, s').fill('0.005');
      await form.getByRole('button', { name: 'Create project' }).click();
      await page.waitForURL((url) => url.pathname === `/projects/${slug}`);
      await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Browser zone controller');
      await expect.poll(() => page.getByTestId('caution').count()).toBe(1);

      const pinForm = page.getByRole('form', { name: 'Pin a reduced model' });
      await pinForm.getByLabel('Reduced model').selectOption(shelf.reducedModel.slug);
      await pinForm.getByLabel('Max order').fill('4');
      await pinForm.getByRole('button', { name: 'Pin' }).click();
      const pinRow = page.locator(`[data-testid="pin-row"][data-model="${shelf.reducedModel.slug}"]`);
      await expect.poll(() => pinRow.getByTestId('resolved-version').textContent()).toContain('v1');

      const tokenForm = page.getByRole('form', { name: 'New project token' });
      await tokenForm.getByLabel('Token name').fill('browser CI');
      await tokenForm.getByRole('button', { name: 'Make token' }).click();
      const shown = page.getByTestId('new-token');
      await expect.poll(() => shown.count()).toBe(1);
      const token = (await shown.textContent())!.trim();
      expect(token).toMatch(/^msp_[A-Za-z0-9_-]{43}$/);
      await screenshot(page, 'project-token-shown-once');

      const pulled = await pullModel(slug, token);
      expect(pulled.status).toBe(200);
      expect(pulled.body.matricesSha256).toBe(matricesSha256(MODEL));
      expect(pulled.body.pin).toMatchObject({ project: { slug }, mode: 'newest_approved', limits: { maxOrder: 4 } });

      // The use shows up in the token list once the page reloads its tokens.
      await page.reload();
      const row = page.locator('[data-testid="token-row"][data-name="browser CI"]');
      await expect.poll(() => row.getByTestId('token-state').textContent()).toBe('active');
      expect(await page.getByTestId('new-token').count()).toBe(0); // shown once, not after a reload
      await row.getByRole('button', { name: 'Revoke' }).click();
      await row.getByRole('button', { name: 'Confirm revoke' }).click();
      await expect.poll(() => row.getByTestId('token-state').textContent()).toBe('revoked');
      await screenshot(page, 'project-token-revoked');

      const refused = await pullModel(slug, token);
      expect(refused.status).toBe(401);
      expect(refused.body.error.code).toBe('token_revoked');
    } finally {
      await browser.close();
    }
  });

  it("shows a viewer the project's pins and downloads but no way to change it or see its tokens", async () => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, viewer.email, viewer.password);
      await page.waitForURL((url) => url.pathname === '/');
      await page.goto(`/projects/${slug}`);
      const pinRow = page.locator(`[data-testid="pin-row"][data-model="${shelf.reducedModel.slug}"]`);
      await expect.poll(() => pinRow.count()).toBe(1);
      expect(await pinRow.getByRole('link', { name: 'C header' }).getAttribute('href')).toMatch(/\/export\?format=c$/);
      expect(await page.getByRole('form', { name: 'Pin a reduced model' }).count()).toBe(0);
      expect(await page.getByRole('region', { name: 'Project tokens' }).count()).toBe(0);
      const download = await page.request.get((await pinRow.getByRole('link', { name: 'JSON' }).getAttribute('href'))!);
      expect(download.status()).toBe(200);
      expect((await download.json()).caution).toMatch(/not a certification/);
      await screenshot(page, 'project-viewer');
    } finally {
      await browser.close();
    }
  });
});
