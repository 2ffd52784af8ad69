// A large model end to end in Debian's chromium against the built app and its worker (issue 14, "Large
// models end to end"): an engineer uploads the demo's hearth plate at 142 × 142 nodes (20,164 states,
// descriptor form with E) as one zip archive through the upload page, sees it analysed on the large-model
// path (figures labelled exact or estimated, the leading Hankel singular values), reduces it to 20 states by
// balanced truncation on the reduce form, and opens the comparison: the full model's frequency response by
// sparse solves and its step and impulse responses by sparse time integration against the reduced model's,
// with the simulation cost of both. Screenshots of each page go to test-output/.
import JSZip from 'jszip';
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { hearthPlate } from '@/db/seeds/demo/plate';
import { openBrowser, screenshot, signIn } from './browser';

const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;

async function expectChartDrawn(page: Page, testId: string): Promise<void> {
  const chart = page.getByTestId(testId).first();
  await chart.waitFor({ state: 'visible' });
  await expect.poll(async () => chart.locator('canvas').count(), { timeout: 20_000 }).toBeGreaterThan(0);
  const box = await chart.locator('canvas').first().boundingBox();
  expect(box?.width ?? 0).toBeGreaterThan(100);
  expect(box?.height ?? 0).toBeGreaterThan(100);
  expect(await chart.getByRole('alert').count()).toBe(0);
}

describe('a large model through the real pages', () => {
  it('uploads a 20,164-state model as a zip, sees it analysed, reduces it to 20 states and opens the comparison', { timeout: 300_000 }, async () => {
    const side = 142;
    const plate = hearthPlate(side);
    const zip = new JSZip();
    for (const role of ['A', 'B', 'C', 'E'] as const) zip.file(`hearth-plate/${role}.mtx`, plate[role]);
    const archive = await zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE' });
    const name = `Browser hearth plate ${Date.now().toString(36)}`;
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');

      await page.goto('/source-models/new');
      await page.getByLabel('Name', { exact: true }).fill(name);
      await page.getByLabel('Description').fill(`${side} × ${side} hearth plate for the browser test`);
      await page.getByLabel('One zip archive of the matrix files').check();
      await page.getByLabel('Zip archive (.zip)').setInputFiles({ name: 'hearth-plate.zip', mimeType: 'application/zip', buffer: archive });
      await screenshot(page, 'large-1-upload-form');
      await page.getByRole('button', { name: 'Upload and analyse' }).click();

      await page.waitForURL(/\/source-models\/[^/]+\/versions\/1$/, { timeout: 60_000 });
      // While it runs, the progress bar says which stage and, in the ADI, its counts and residual.
      const progress = page.getByTestId('job-progress');
      const figures = page.getByTestId('analysis-figures');
      const seen: string[] = [];
      const deadline = Date.now() + 180_000;
      while (!(await figures.isVisible()) && Date.now() < deadline) {
        const text = (await progress.count()) ? await progress.first().textContent().catch(() => null) : null;
        if (text && !seen.includes(text)) {
          seen.push(text);
          if (/ADI step/.test(text) && !seen.some((t, k) => k < seen.length - 1 && /ADI step/.test(t))) await screenshot(page, 'large-2-analysis-progress');
        }
        await new Promise((r) => setTimeout(r, 150));
      }
      await figures.waitFor({ timeout: 5_000 });
      expect(seen.join('\n')).toMatch(/ADI step \d+ of at most \d+, residual/);
      expect(await page.getByTestId('figure-dimensions').textContent()).toBe(`${side * side}, 2, 3`);
      await page.getByTestId('sparse-analysis').waitFor();
      const rows = page.getByTestId('analysis-figures');
      await expect.poll(() => rows.getByTestId('figure-basis').allTextContents()).toEqual(expect.arrayContaining(['exact', 'estimated']));
      expect(await page.getByTestId('figure-hsv-resolved').textContent()).toMatch(/^\d+$/);
      expect(Number(await page.getByTestId('figure-hsv-resolved').textContent())).toBeGreaterThanOrEqual(20);
      await expectChartDrawn(page, 'pole-map');
      await expectChartDrawn(page, 'hankel-chart');
      expect(await page.getByTestId('hsv-leading-note').count()).toBe(1);

      // The order by number (the large-model path has no tolerance rule); 20 states.
      const orderField = page.getByLabel('Order r', { exact: true });
      await orderField.fill('20');
      await orderField.press('Enter');
      await expect.poll(() => orderField.inputValue()).toBe('20');
      expect(await page.getByRole('radiogroup', { name: 'Order rule' }).count()).toBe(0);
      await screenshot(page, 'large-3-analysed');

      await page.getByLabel('Name of the new reduced model').fill(`${name}, 20 states`);
      await page.getByRole('button', { name: 'Run balanced truncation' }).click();
      await page.waitForURL(/\/reduced-models\/[^/]+\/versions\/1$/, { timeout: 180_000 });

      for (const chart of ['bode-chart', 'singular-value-chart', 'error-bound-chart', 'time-response-step', 'time-response-impulse']) {
        await expectChartDrawn(page, chart);
      }
      await expect.poll(() => page.getByTestId('figures-table').textContent()).toMatch(/→ 20/);
      // The full model's time responses come from the engine's sparse time integration, with the cost of both.
      expect(await page.getByTestId('full-time-note').count()).toBe(0);
      expect(await page.getByTestId('cost-rows').textContent()).toMatch(/stiff/);
      expect(await page.getByTestId('estimated-figures').textContent()).toMatch(/hInfinityError/);
      expect(await page.getByTestId('caution').count()).toBe(1);
      await screenshot(page, 'large-4-comparison');
    } finally {
      await browser.close();
    }
  });
});
