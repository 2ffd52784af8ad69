// What a new person meets first on a freshly seeded shelf, in Debian's chromium against the built app
// (issue 16, "a newcomer trips over"):
//   - the Dashboard's activity feed shows the seed's events from the audit log, and an upload of their own
//     at once (it used to say that nothing had happened);
//   - the Hankel-singular-value chart of the seeded 200-state kiln wall opens on the meaningful values
//     (above σ1·1e-12, at most the first hundred, the chosen order included), with the rounding floor named;
//   - the acceptance verdict on the comparison page's error chart is written once, inside the chart's frame,
//     unclipped, and says what the review sheet says (both show the worker's stored verdict).
// Screenshots go to test-output/.
import { describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { openBrowser, screenshot, signIn } from './browser';

const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;

describe('what a newcomer sees first', () => {
  it('the Dashboard lists the seed’s events from the audit log, then their own upload', async () => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');
      const feed = page.getByTestId('recent-activity');
      expect(await feed.textContent()).not.toContain('Nothing has happened');
      const seeded = feed.locator('[data-testid="activity-item"][data-action="source_model.created"]', { hasText: 'K-7 kiln wall thermal network v1' });
      expect(await seeded.count()).toBe(1);
      expect(await seeded.textContent()).toContain(`${engineer.name} uploaded a new source model, K-7 kiln wall thermal network v1`);
      expect(await feed.locator('[data-action="reduced_version.registered"]').count()).toBeGreaterThan(0);
      await screenshot(page, 'newcomer-1-dashboard-seeded');

      // An upload of their own appears at the top of the feed.
      const name = `Newcomer lag ${Date.now().toString(36)}`;
      await page.goto('/source-models/new');
      await page.getByLabel('Name', { exact: true }).fill(name);
      const model = JSON.stringify({ A: [[-1, 0], [0, -20]], B: [[1], [1]], C: [[1, 0.5]], D: [[0]] });
      await page.getByLabel('Model file (.json)').setInputFiles({ name: 'lag.json', mimeType: 'application/json', buffer: Buffer.from(model) });
      await page.getByRole('button', { name: 'Upload and analyse' }).click();
      await page.waitForURL(/\/source-models\/[^/]+\/versions\/1$/);
      await page.goto('/');
      const first = page.getByTestId('recent-activity').getByTestId('activity-item').first();
      expect(await first.getAttribute('data-action')).toBe('source_model.created');
      expect(await first.textContent()).toContain(`${engineer.name} uploaded a new source model, ${name} v1`);
      expect(await first.getByRole('link', { name: `${name} v1` }).getAttribute('href')).toMatch(/^\/source-models\/[^/]+\/versions\/1$/);
      await screenshot(page, 'newcomer-2-dashboard-after-upload');
    } finally {
      await browser.close();
    }
  });

  it('the Hankel chart of a 200-state model opens on the meaningful values and names the rounding floor', async () => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');
      await page.goto('/source-models/k7-kiln-wall/versions/1');
      const chart = page.getByTestId('hankel-chart');
      await expect.poll(() => chart.locator('canvas').count(), { timeout: 20_000 }).toBeGreaterThan(0);
      const view = page.getByTestId('hankel-view');
      const shown = Number(await view.getAttribute('data-shown'));
      const count = Number(await view.getAttribute('data-count'));
      const meaningful = Number(await view.getAttribute('data-meaningful'));
      const order = Number(await page.getByLabel('Order r', { exact: true }).inputValue());
      expect(count).toBe(200);
      // Not all 200 values: the meaningful ones, at most 100, and the chosen stable order with one past it.
      expect(shown).toBeLessThan(count);
      expect(shown).toBe(Math.min(count, Math.max(Math.min(Math.max(meaningful, 1), 100), order + 1)));
      // The floor σ1·n·ε is shaded where the view reaches it; for this wall it lies below the view, and the note says so.
      expect(await view.textContent()).toMatch(
        new RegExp(`^Opens on σ1…σ${shown} of 200: .*(Shaded: the rounding floor σ1·n·ε = \\S+|The rounding floor σ1·n·ε = \\S+, below this view); values under it cannot be told from rounding\\.$`),
      );
      await chart.scrollIntoViewIfNeeded();
      await screenshot(page, 'newcomer-3-hankel-chart');
    } finally {
      await browser.close();
    }
  });

  it('the acceptance verdict is written once, inside the error chart, unclipped, as the review sheet states it', async () => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');
      await page.goto('/reduced-models');
      await page.getByRole('link', { name: 'K-7 wall, control model' }).click();
      await page.locator('a[href$="/versions/1"]').first().click();
      await page.waitForURL(/\/reduced-models\/[^/]+\/versions\/1$/);
      const chart = page.getByTestId('error-bound-chart');
      await expect.poll(() => chart.locator('canvas').count(), { timeout: 20_000 }).toBeGreaterThan(0);

      const verdict = page.getByTestId('acceptance-verdict');
      expect(await verdict.count()).toBe(1);
      const status = (await verdict.getAttribute('data-status'))!;
      const word = { pass: 'PASS', fail: 'FAIL', 'not-checked': 'NOT CHECKED' }[status];
      expect(word).toBeTruthy();
      const sentence = (await verdict.textContent())!;
      expect(sentence.startsWith(`${word}:`)).toBe(true);
      // Once: the chart's figure holds the verdict's word only in that one element.
      const figureText = (await page.locator('figure', { has: chart }).textContent())!;
      expect(figureText.split(`${word}:`).length - 1).toBe(1);
      // Inside the chart's frame, and not clipped: its box lies within the canvas box, its text fits its box.
      const chartBox = (await chart.locator('canvas').first().boundingBox())!;
      const box = (await verdict.boundingBox())!;
      expect(box.x).toBeGreaterThanOrEqual(chartBox.x);
      expect(box.y).toBeGreaterThanOrEqual(chartBox.y);
      expect(box.x + box.width).toBeLessThanOrEqual(chartBox.x + chartBox.width + 0.5);
      expect(box.y + box.height).toBeLessThanOrEqual(chartBox.y + chartBox.height + 0.5);
      const fits = await verdict.evaluate((el) => el.scrollWidth <= el.clientWidth && el.scrollHeight <= el.clientHeight);
      expect(fits).toBe(true);
      await chart.scrollIntoViewIfNeeded();
      await screenshot(page, 'newcomer-4-error-chart-verdict');

      // The review sheet states the same stored verdict.
      await page.getByRole('link', { name: 'Review sheet' }).first().click();
      await page.waitForURL(/\/reviews\/[^/]+$/);
      const line = page.locator('tr[data-figure="acceptance"] td').first();
      expect((await line.textContent())!.startsWith(word!)).toBe(true);
    } finally {
      await browser.close();
    }
  });
});
