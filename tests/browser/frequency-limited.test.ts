// Frequency-limited balanced truncation in Debian's chromium against the built app and its worker
// (issue 15): an engineer gives a controller project an acceptance band (a bad one is refused beside its
// field), opens a source version from the project (?project=slug) and finds the method chosen with the band
// started from the project's, sees a bad band refused beside its field, switches the unit to Hz (the
// numbers follow), runs the reduction and reads the measured errors inside and outside the band, "no
// a-priori error bound" and the stability flag on the comparison page, with the caution. Screenshots go to
// test-output/. The model is an invented lightly damped 8-state structure, reduced in seconds.
import { randomUUID } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { openBrowser, screenshot, signIn } from './browser';

const engineer = DEMO_PEOPLE.find((p) => p.role === 'engineer')!;

/** Modes at 1, 4, 15 and 50 rad/s, damping ratio 0.02, one input on every mode, one output summing them. */
function structureJson(): string {
  const freqs = [1, 4, 15, 50];
  const n = 2 * freqs.length;
  const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const B = Array.from({ length: n }, () => [0]);
  const C = [new Array<number>(n).fill(0)];
  freqs.forEach((w, k) => {
    A[2 * k][2 * k + 1] = 1;
    A[2 * k + 1][2 * k] = -w * w;
    A[2 * k + 1][2 * k + 1] = -0.04 * w;
    B[2 * k + 1][0] = 1;
    C[0][2 * k] = 1;
  });
  return JSON.stringify({ A, B, C, D: [[0]], timeBase: 's' });
}

describe('frequency-limited balanced truncation in the browser', () => {
  it('sets a project band, reduces for it from the project, and shows the band errors without a bound', async () => {
    const slug = `fl-browser-${randomUUID().slice(0, 8)}`;
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, engineer.email, engineer.password);
      await page.waitForURL((url) => url.pathname === '/');

      // A project, and its acceptance band: refused beside the field when upside down, then saved.
      const created = await page.request.post('/api/projects', { data: { name: `Band loop ${slug}`, slug } });
      expect(created.status()).toBe(201);
      await page.goto(`/projects/${slug}`);
      const bandForm = page.getByRole('form', { name: 'Acceptance band' });
      await bandForm.getByLabel('Acceptance band from, rad/s').fill('60');
      await bandForm.getByLabel('to, rad/s').fill('10');
      await bandForm.getByRole('button', { name: 'Save band' }).click();
      await expect.poll(() => page.getByTestId('error-acceptanceBand.maxFrequency').textContent()).toMatch(/above the lower edge/);
      await bandForm.getByLabel('Acceptance band from, rad/s').fill('10');
      await bandForm.getByLabel('to, rad/s').fill('60');
      await bandForm.getByLabel('Largest error |G − Gr| (optional)').fill('0.05');
      await bandForm.getByRole('button', { name: 'Save band' }).click();
      await expect.poll(() => page.getByTestId('project-acceptance-band').textContent(), { timeout: 20_000 }).toMatch(/^10\u00a0rad\/s to 60\u00a0rad\/s, error at most 0.05$/);
      await screenshot(page, 'frequency-limited-1-project-band');

      // A source model, uploaded through the API with this session, analysed by the worker.
      const upload = await page.request.post('/api/uploads/source-models', {
        multipart: { name: `Structure ${slug}`, model: { name: 'structure.json', mimeType: 'application/json', buffer: Buffer.from(structureJson()) } },
      });
      expect(upload.status()).toBe(202);
      const uploaded = (await upload.json()) as { sourceModel: { slug: string }; version: { number: number } };
      await page.goto(`/source-models/${uploaded.sourceModel.slug}/versions/${uploaded.version.number}?project=${slug}`);
      await page.getByTestId('analysis-figures').waitFor({ timeout: 90_000 });

      // Arriving from the project: the method is chosen and the band is the project's.
      const form = page.getByTestId('recipe-form');
      expect(await form.getByLabel('Method').inputValue()).toBe('frequency-limited');
      await expect.poll(() => form.getByTestId('limited-band-seed').textContent()).toContain(`Band loop ${slug}`);
      const from = form.getByLabel('From', { exact: true });
      const to = form.getByLabel('To', { exact: true });
      expect(await from.inputValue()).toBe('10');
      expect(await to.inputValue()).toBe('60');
      expect(await form.getByTestId('order-slider-no-bound').textContent()).toMatch(/no a-priori error bound/);

      // A band upside down is refused beside its field, and nothing is queued.
      await from.fill('80');
      await form.getByLabel('Name of the new reduced model').fill(`Band ROM ${slug}`);
      await form.getByRole('button', { name: 'Run frequency-limited balanced truncation' }).click();
      await expect.poll(() => form.getByTestId('error-recipe.limitedBand.maxFrequency').textContent()).toMatch(/upper edge must be above its lower edge/);
      expect(await form.getByTestId('job-progress').count()).toBe(0);
      await from.fill('10');
      await expect.poll(() => form.getByTestId('error-recipe.limitedBand.maxFrequency').count()).toBe(0); // gone once the band is edited

      // Hz: the numbers follow the unit (ω = 2πf), and the server converts them back.
      await form.getByLabel('Unit').selectOption('hz');
      expect(Number(await from.inputValue())).toBeCloseTo(10 / (2 * Math.PI), 4);
      expect(Number(await to.inputValue())).toBeCloseTo(60 / (2 * Math.PI), 4);
      const orderField = form.getByLabel('Order r', { exact: true });
      await orderField.fill('4');
      await orderField.press('Enter');
      await expect.poll(() => orderField.inputValue()).toBe('4');
      await screenshot(page, 'frequency-limited-2-recipe');
      await form.getByRole('button', { name: 'Run frequency-limited balanced truncation' }).click();
      await page.waitForURL(/\/reduced-models\/[^/]+\/versions\/1$/, { timeout: 120_000 });

      // The comparison page: the band errors, no bound, the stability flag, the caution.
      const summary = page.getByTestId('band-errors');
      await summary.waitFor();
      const text = (await summary.textContent()) ?? '';
      expect(text).toMatch(/Balanced on the band 10–60\u00a0rad\/s/);
      expect(text).toMatch(/inside the band \d/);
      expect(text).toMatch(/outside it \d/);
      expect(text).toContain('No a-priori error bound for this method');
      expect(await page.getByTestId('reduced-stable').textContent()).toMatch(/^Reduced model stable: (yes|no)/);
      const report = page.getByTestId('figures-table');
      expect(await report.textContent()).toContain('no a-priori error bound for this method');
      expect(await page.getByTestId('caution').count()).toBeGreaterThan(0);
      expect(await page.getByRole('heading', { level: 1 }).textContent()).toContain(`Band ROM ${slug}`);
      await screenshot(page, 'frequency-limited-3-comparison');
    } finally {
      await browser.close();
    }
  });
});
