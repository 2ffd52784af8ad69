// The reduction workspace end to end in Debian's chromium against the built app and its worker (issue 5):
// an engineer uploads a Matrix Market model, watches the analysis progress bar, sees the pole map and the
// Hankel singular value chart, sets an order with the slider's number field, runs balanced truncation, and
// opens the comparison page with every chart drawn. Screenshots of each page go to test-output/.
//
// The model is the demo kiln wall at a test size (8 nodes through the wall × 5 zones = 40 states, 2 inputs,
// 3 outputs), small enough that the jobs take seconds.
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { kilnWallNetwork, matrixMarketCoordinate } from '@/db/seeds/demo/models';
import { openBrowser, screenshot, signIn } from './browser';

const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;

/** A chart is drawn when its container holds a canvas with a size and no "cannot be drawn" message. */
async function expectChartDrawn(page: Page, testId: string): Promise<void> {
  const chart = page.getByTestId(testId).first();
  await chart.waitFor({ state: 'visible' });
  await expect.poll(async () => chart.locator('canvas').count(), { timeout: 20_000 }).toBeGreaterThan(0);
  const box = await chart.locator('canvas').first().boundingBox();
  expect(box?.width ?? 0).toBeGreaterThan(100);
  expect(box?.height ?? 0).toBeGreaterThan(100);
  expect(await chart.getByRole('alert').count()).toBe(0);
}

describe('the reduction workspace', () => {
  it('uploads a Matrix Market model, analyses it, reduces it and compares full and reduced', async () => {
    const model = kilnWallNetwork(8, 5);
    const file = (name: string, m: number[][]) => ({ name, mimeType: 'text/plain', buffer: Buffer.from(matrixMarketCoordinate(m, name)) });
    const name = `Browser kiln wall ${Date.now().toString(36)}`;
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');

      await page.goto('/source-models');
      await page.getByRole('link', { name: 'Upload a source model' }).click();
      await page.getByLabel('Name', { exact: true }).fill(name);
      await page.getByLabel('Description').fill('40-state wall section for the browser test');
      await page.getByLabel('Matrix files A, B, C, D (Matrix Market .mtx or CSV)').check();
      await page.getByLabel('A (n×n)').setInputFiles(file('A.mtx', model.A));
      // First a B with one row too many: the engine's message appears beside the B field, nothing is stored.
      await page.getByLabel('B (n×m)').setInputFiles(file('B.mtx', [...model.B, [1, 0]]));
      await page.getByLabel('C (p×n)').setInputFiles(file('C.mtx', model.C));
      await page.getByRole('button', { name: 'Upload and analyse' }).click();
      await expect.poll(() => page.getByTestId('error-B').textContent(), { timeout: 20_000 }).toMatch(/B has 41 rows but A is 40×40/);
      expect(new URL(page.url()).pathname).toBe('/source-models/new');
      await screenshot(page, 'workspace-1-upload-error');

      await page.getByLabel('B (n×m)').setInputFiles(file('B.mtx', model.B));
      await screenshot(page, 'workspace-1-upload-form');
      await page.getByRole('button', { name: 'Upload and analyse' }).click();

      // The version page shows the analysis job until it is done, then the analysis.
      await page.waitForURL(/\/source-models\/[^/]+\/versions\/1$/);
      // The bar may already be gone on a fast machine; when it is there, it says what the job is doing.
      const progress = page.getByTestId('job-progress');
      if (await progress.count()) {
        expect(await progress.getByRole('progressbar').getAttribute('aria-valuetext')).toBeTruthy();
        await screenshot(page, 'workspace-2-analysis-progress');
      }
      await page.getByTestId('analysis-figures').waitFor({ timeout: 60_000 });
      expect(await page.getByTestId('figure-dimensions').textContent()).toBe('40, 2, 3');
      await expectChartDrawn(page, 'pole-map');
      await expectChartDrawn(page, 'hankel-chart');

      // The slider's number field snaps to an allowed order; the figures follow at once.
      const orderField = page.getByLabel('Order r', { exact: true });
      await orderField.fill('6');
      await orderField.press('Enter');
      await expect.poll(() => orderField.inputValue()).toBe('6');
      const slider = page.getByTestId('order-slider');
      expect(await slider.getByRole('slider').getAttribute('aria-valuetext')).toMatch(/^order 6, error bound /);
      await screenshot(page, 'workspace-3-version-analysed');

      await page.getByLabel('Name of the new reduced model').fill(`${name}, 6 states`);
      await page.getByRole('button', { name: 'Run balanced truncation' }).click();
      await page.waitForURL(/\/reduced-models\/[^/]+\/versions\/1$/, { timeout: 90_000 });

      for (const chart of ['bode-chart', 'singular-value-chart', 'error-bound-chart', 'time-response-step', 'time-response-impulse']) {
        await expectChartDrawn(page, chart);
      }
      await expect.poll(() => page.getByTestId('figures-table').textContent()).toMatch(/40 → 6/);
      expect(await page.getByTestId('caution').count()).toBe(1);
      expect(await page.getByTestId('cost-rows').textContent()).toMatch(/stiff/);
      // MIMO: the channel picker changes the Bode plot's channel.
      const picker = page.getByTestId('channel-picker');
      await picker.getByLabel('Output').selectOption({ index: 2 });
      await expect.poll(() => page.getByTestId('bode-chart').locator('xpath=..').textContent()).toMatch(/casing temperature|y3/);
      await screenshot(page, 'workspace-4-comparison');
    } finally {
      await browser.close();
    }
  });
});
