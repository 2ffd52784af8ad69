// Review in the built app, driven through chromium as the demo people: the engineer submits a draft, the
// reviewer finds it in the queue and approves it, the author can never approve their own version (whatever
// their role), and the mails land on Admin › Mail. The draft itself is inserted directly
// (tests/integration/fixtures/shelf.ts); uploading and reducing through the pages is tests/browser/
// review-upstream.test.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { closeDb, db } from '@/lib/db';
import { openBrowser, screenshot, signIn, type OpenBrowser } from './browser';
import { makeShelf, markInReview, type Shelf } from '../integration/fixtures/shelf';

const person = (role: (typeof DEMO_PEOPLE)[number]['role']) => DEMO_PEOPLE.find((p) => p.role === role)!;
const ids = {} as Record<string, string>;

beforeAll(async () => {
  for (const p of DEMO_PEOPLE) ids[p.role] = (await db()('users').where({ email: p.email }).first('id')).id;
  // The demo people get every mail (an earlier run may have left a box unticked). The many reviewers the
  // integration tests made opt out of review requests, so this run's few mails are what Admin › Mail shows.
  await db()('notification_preferences').whereIn('user_id', Object.values(ids)).delete();
  const others = await db()('users').where({ role: 'reviewer' }).whereNotIn('id', Object.values(ids)).pluck('id');
  for (const id of others) {
    await db()('notification_preferences').insert({ user_id: id, review_requested: false }).onConflict('user_id').merge(['review_requested']);
  }
});

afterAll(async () => {
  await closeDb();
});

async function signedIn(role: (typeof DEMO_PEOPLE)[number]['role']): Promise<OpenBrowser> {
  const browser = await openBrowser();
  const p = person(role);
  await signIn(browser.page, p.email, p.password);
  await browser.page.waitForURL((url) => url.pathname === '/');
  return browser;
}

const panelStatus = (page: Page) => page.getByTestId('review-panel').getByTestId('status-badge').getAttribute('data-status');

/** Reloads Admin › Mail until a message with this subject to this address is listed (delivery is after commit). */
async function waitForMail(page: Page, subject: string, to: string): Promise<void> {
  await expect
    .poll(
      async () => {
        await page.goto('/admin/mail');
        return page.locator(`[data-testid="mail-message"][data-to*="${to}"]`).filter({ hasText: subject }).count();
      },
      { timeout: 30_000, interval: 1_000 },
    )
    .toBeGreaterThanOrEqual(1);
}

describe('review through the pages', () => {
  let shelf: Shelf;

  it('the engineer submits a draft with a note; the author is offered no approval, and the API refuses one', async () => {
    shelf = await makeShelf(ids.engineer);
    const browser = await signedIn('engineer');
    try {
      const { page } = browser;
      await page.goto(`/reviews/${shelf.version.id}`);
      await expect.poll(() => panelStatus(page)).toBe('draft');
      await page.getByLabel('A note for the reviewer').fill('Order 1 keeps the slow zone pole; bound 4.8e-3 over the band.');
      await page.getByRole('button', { name: 'Submit for review' }).click();
      await expect.poll(() => panelStatus(page)).toBe('in_review');
      await expect.poll(() => page.getByRole('status').first().textContent()).toContain('Submitted for review');
      expect(await page.getByRole('button', { name: 'Approve' }).count()).toBe(0);
      expect(await page.getByTestId('review-entry').first().textContent()).toContain('submitted for review');

      const refused = await page.request.post(`/api/reduced-versions/${shelf.version.id}/approve`, { data: { comment: 'Looks right to me.' } });
      expect(refused.status()).toBe(403);
      expect((await refused.json()).error.code).toBe('forbidden');
      await screenshot(page, 'review-submitted-engineer');
    } finally {
      await browser.close();
    }
  });

  it('the reviewer sees it in the queue and on the Dashboard, and approves it with a comment', async () => {
    const browser = await signedIn('reviewer');
    try {
      const { page } = browser;
      const name = `${shelf.reducedModel.name} v1`;
      await page.getByTestId('awaiting-your-review').waitFor({ state: 'visible' });
      expect(await page.getByTestId('awaiting-your-review').textContent()).toContain(name);
      await page.goto('/reviews');
      const row = page.locator(`[data-testid="queue-row"][data-version="${shelf.version.id}"]`);
      await row.waitFor({ state: 'visible' });
      expect(await row.textContent()).toContain('yours to decide');
      await screenshot(page, 'review-queue-reviewer');
      // The version's name opens its comparison page (which carries the same panel; curves are drawn
      // there only for versions a reduction made, see review-upstream.test.ts); this fixture version
      // has figures but no curves, so the review sheet beside it is used here.
      expect(await row.getByRole('link', { name }).getAttribute('href')).toBe(`/reduced-models/${shelf.reducedModel.slug}/versions/1`);
      await row.getByRole('link', { name: 'review sheet' }).click();
      await page.waitForURL((url) => url.pathname === `/reviews/${shelf.version.id}`);
      await expect.poll(() => panelStatus(page)).toBe('in_review');
      await page.getByLabel('A comment for the author').fill('Bode and step agree within the bound over 0.1 to 100 rad/s.');
      await page.getByRole('button', { name: 'Approve' }).click();
      await expect.poll(() => panelStatus(page)).toBe('approved');
      await expect.poll(() => page.getByTestId('approval-snapshot').count()).toBe(1);
      expect(await page.getByTestId('approval-snapshot').textContent()).toContain('At approval');
      await screenshot(page, 'review-approved-reviewer');

      const again = await page.request.post(`/api/reduced-versions/${shelf.version.id}/approve`, { data: { comment: 'Twice.' } });
      expect(again.status()).toBe(409);
      expect((await again.json()).error).toMatchObject({ code: 'state_conflict' });
    } finally {
      await browser.close();
    }
  });

  it('the mails appear on Admin › Mail: review requested to the reviewer, approved to the author', async () => {
    const browser = await signedIn('admin');
    try {
      const { page } = browser;
      const name = `${shelf.reducedModel.name} v1`;
      await waitForMail(page, `Review requested: ${name}`, person('reviewer').email);
      await waitForMail(page, `Approved: ${name}`, person('engineer').email);
      const approved = page.locator(`[data-testid="mail-message"][data-to*="${person('engineer').email}"]`).filter({ hasText: `Approved: ${name}` }).first();
      expect(await approved.textContent()).toContain('Bode and step agree within the bound');
      expect(await approved.textContent()).toContain(`/reviews/${shelf.version.id}`);
      await screenshot(page, 'review-mail');
    } finally {
      await browser.close();
    }
  });

  it('shows the lineage of the reduced model with its state in words', async () => {
    const browser = await signedIn('viewer');
    try {
      const { page } = browser;
      await page.goto(`/lineage/reduced-models/${shelf.reducedModel.slug}`);
      await expect.poll(() => page.getByTestId('lineage-graph').locator('canvas').count()).toBeGreaterThanOrEqual(1);
      const item = page.locator(`[data-testid="lineage-list"] [data-node="${shelf.version.id}"]`);
      expect(await item.textContent()).toContain('approved');
      expect(await item.textContent()).toContain(`reduced from source v1`);
      await screenshot(page, 'lineage-reduced-model');
      // A viewer reads the review but is offered nothing to do.
      await page.goto(`/reviews/${shelf.version.id}`);
      await expect.poll(() => panelStatus(page)).toBe('approved');
      expect(await page.getByRole('button', { name: /Retire|Approve|Add comment/ }).count()).toBe(0);
    } finally {
      await browser.close();
    }
  });
});

describe('the four-eyes rule in the pages', () => {
  it('refuses a reviewer their own version: no Approve button, the reason shown, and 403 from the API', async () => {
    // Authored by the demo reviewer (as after a role change from engineer), now in review.
    const own = await makeShelf(ids.reviewer);
    await markInReview(own.version.id);
    const browser = await signedIn('reviewer');
    try {
      const { page } = browser;
      await page.goto(`/reviews/${own.version.id}`);
      await expect.poll(() => panelStatus(page)).toBe('in_review');
      expect(await page.getByRole('button', { name: 'Approve' }).count()).toBe(0);
      expect(await page.getByTestId('withheld').first().textContent()).toMatch(/You authored this version.*four-eyes rule/);
      const refused = await page.request.post(`/api/reduced-versions/${own.version.id}/approve`, { data: { comment: 'Mine is fine.' } });
      expect(refused.status()).toBe(403);
      const body = await refused.json();
      expect(body.error.code).toBe('four_eyes');
      expect(body.error.message).toMatch(/You authored this version/);
      await screenshot(page, 'review-four-eyes');
      expect((await db()('reduced_versions').where({ id: own.version.id }).first('status')).status).toBe('in_review');
    } finally {
      await browser.close();
    }
  });
});

describe('notification settings', () => {
  it('are reached from the shell and kept per person', async () => {
    const browser = await signedIn('engineer');
    try {
      const { page } = browser;
      await page.getByRole('link', { name: 'Profile and notifications' }).click();
      await page.waitForURL((url) => url.pathname === '/profile');
      const box = page.getByLabel('My version is approved or sent back for revision');
      expect(await box.isChecked()).toBe(true);
      expect(await page.getByLabel('A version is submitted for review').count()).toBe(0); // reviewers only
      await box.uncheck();
      await expect.poll(() => page.getByRole('status').textContent()).toBe('Saved.');
      await page.reload();
      expect(await page.getByLabel('My version is approved or sent back for revision').isChecked()).toBe(false);
      await screenshot(page, 'profile-notifications');
      await page.getByLabel('My version is approved or sent back for revision').check();
      await expect.poll(() => page.getByRole('status').textContent()).toBe('Saved.');
    } finally {
      await browser.close();
    }
  });
});
