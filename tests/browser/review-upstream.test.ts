// Upstream changes through the pages, against the built app and its worker: the engineer uploads a source
// model, reduces it, and it is approved; the engineer then uploads a new version of the source model. The
// reduced model is marked upstream changed on its page and in the list, its author is mailed, and "Re-run
// recipe" produces a new draft version with the same recipe on the new source version, whose review sheet
// shows old against new accuracy.
//
// The model is the demo kiln wall at a test size (6 nodes through the wall × 4 zones = 24 states); the
// second version's outer insulation conducts 20 % better (a refit), so its poles move. Invented data.
import { afterAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { kilnWallNetwork } from '@/db/seeds/demo/models';
import { closeDb } from '@/lib/db';
import { openBrowser, screenshot, signIn, type OpenBrowser } from './browser';

const person = (role: (typeof DEMO_PEOPLE)[number]['role']) => DEMO_PEOPLE.find((p) => p.role === role)!;

afterAll(async () => {
  await closeDb();
});

async function signedIn(role: (typeof DEMO_PEOPLE)[number]['role']): Promise<OpenBrowser> {
  const browser = await openBrowser();
  await signIn(browser.page, person(role).email, person(role).password);
  await browser.page.waitForURL((url) => url.pathname === '/');
  return browser;
}

function modelFile(scaleDiagonal: number) {
  const m = kilnWallNetwork(6, 4);
  const A = m.A.map((row, i) => row.map((v, j) => (i === j ? v * scaleDiagonal : v)));
  return { name: 'kiln-wall.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify({ A, B: m.B, C: m.C, D: m.D, timeBase: 's' })) };
}

const panelStatus = (page: Page) => page.getByTestId('review-panel').getByTestId('status-badge').getAttribute('data-status');

describe('a new source version', () => {
  const name = `Upstream kiln wall ${Date.now().toString(36)}`;
  let sourceUrl = '';
  let reducedUrl = '';

  it('starts from an approved reduced model made through the pages', async () => {
    const engineer = await signedIn('engineer');
    try {
      const { page } = engineer;
      await page.goto('/source-models/new');
      await page.getByLabel('Name', { exact: true }).fill(name);
      await page.getByLabel('Model file (.json)').setInputFiles(modelFile(1));
      await page.getByRole('button', { name: 'Upload and analyse' }).click();
      await page.waitForURL(/\/source-models\/[^/]+\/versions\/1$/, { timeout: 30_000 });
      sourceUrl = new URL(page.url()).pathname.replace(/\/versions\/1$/, '');
      await page.getByTestId('analysis-figures').waitFor({ timeout: 90_000 });
      const orderField = page.getByLabel('Order r', { exact: true });
      await orderField.fill('4');
      await orderField.press('Enter');
      await page.getByLabel('Name of the new reduced model').fill(`${name}, 4 states`);
      await page.getByRole('button', { name: 'Run balanced truncation' }).click();
      await page.waitForURL(/\/reduced-models\/[^/]+\/versions\/1$/, { timeout: 90_000 });
      reducedUrl = new URL(page.url()).pathname.replace(/\/versions\/1$/, '');
      await page.getByLabel('A note for the reviewer').fill('Order 4 of the 24-state wall; bound met over the band.');
      await page.getByRole('button', { name: 'Submit for review' }).click();
      await expect.poll(() => panelStatus(page)).toBe('in_review');
    } finally {
      await engineer.close();
    }
    const reviewer = await signedIn('reviewer');
    try {
      const { page } = reviewer;
      await page.goto(`${reducedUrl}/versions/1`);
      await page.getByLabel('A comment for the author').fill('Step and Bode agree; approved.');
      await page.getByRole('button', { name: 'Approve' }).click();
      await expect.poll(() => panelStatus(page)).toBe('approved');
    } finally {
      await reviewer.close();
    }
  });

  it('marks the reduced model upstream changed on its page and in the list once a new source version is uploaded', async () => {
    const engineer = await signedIn('engineer');
    try {
      const { page } = engineer;
      await page.goto(sourceUrl);
      const form = page.getByRole('form', { name: 'Upload a new version' });
      await form.getByLabel('Version notes').fill('Outer insulation refit: conductance up 20 %.');
      await form.getByLabel('Model file (.json)').setInputFiles(modelFile(1.2));
      await form.getByRole('button', { name: 'Upload version' }).click();
      await page.waitForURL(/\/source-models\/[^/]+\/versions\/2$/, { timeout: 30_000 });
      await page.getByTestId('analysis-figures').waitFor({ timeout: 90_000 });

      await page.goto(reducedUrl);
      const notice = page.getByTestId('upstream-notice').first();
      await notice.waitFor({ state: 'visible' });
      expect(await notice.textContent()).toMatch(/Upstream changed: v1 \(approved\) was reduced from .* v1; the source model now has v2/);
      await screenshot(page, 'upstream-reduced-model');

      await page.goto('/reduced-models');
      const row = page.getByTestId('reduced-models-table').locator('tr', { hasText: `${name}, 4 states` });
      expect(await row.getByTestId('upstream-changed').textContent()).toContain('source v1 → v2');
    } finally {
      await engineer.close();
    }
  });

  it('mails the author that the source changed', async () => {
    const admin = await signedIn('admin');
    try {
      const { page } = admin;
      await expect
        .poll(
          async () => {
            await page.goto('/admin/mail');
            return page
              .locator(`[data-testid="mail-message"][data-to*="${person('engineer').email}"]`)
              .filter({ hasText: `Upstream changed: ${name} has version 2` })
              .count();
          },
          { timeout: 30_000, interval: 1_000 },
        )
        .toBeGreaterThanOrEqual(1);
    } finally {
      await admin.close();
    }
  });

  it('re-runs the recipe on the new version: a new draft, with old against new accuracy', async () => {
    const engineer = await signedIn('engineer');
    try {
      const { page } = engineer;
      await page.goto(reducedUrl);
      await page.getByTestId('rerun-recipe').click();
      await expect.poll(() => page.getByTestId('upstream-notice').first().getByRole('status').textContent()).toMatch(/Re-run queued on source v2/);
      // The worker reduces the new version; the draft is the reduced model's version 2.
      await expect
        .poll(
          async () => {
            await page.goto(reducedUrl);
            return page.getByTestId('reduced-versions-table').locator('tr', { hasText: 'v2' }).count();
          },
          { timeout: 120_000, interval: 2_000 },
        )
        .toBeGreaterThanOrEqual(1);
      await page.goto(`${reducedUrl}/versions/2`);
      await expect.poll(() => panelStatus(page)).toBe('draft');
      await page.getByRole('link', { name: 'Review sheet' }).click();
      await page.waitForURL(/\/reviews\//);
      const oldNew = page.getByTestId('old-against-new');
      await oldNew.waitFor({ state: 'visible' });
      expect(await oldNew.textContent()).toMatch(/v1, source v1.*v2, source v2/);
      expect(await oldNew.locator('[data-figure="reducedOrder"]').textContent()).toMatch(/4.*4/);
      await screenshot(page, 'upstream-rerun-old-against-new');
      // The old version now points at its re-run instead of offering another.
      await page.goto(reducedUrl);
      expect(await page.getByTestId('upstream-notice').first().textContent()).toMatch(/Re-run on source v2: v2 \(draft\)/);
      expect(await page.getByTestId('rerun-recipe').count()).toBe(0);
    } finally {
      await engineer.close();
    }
  });
});
