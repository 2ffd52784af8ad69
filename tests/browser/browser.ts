// Debian's chromium driven by playwright-core (no browser download): headless, a fresh profile per
// browser, and the switches that stop it from calling home.
import { mkdtempSync, mkdirSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

// Not BASE_URL: vitest sets that one itself (to "/").
export const BASE_URL = (process.env.MODESHELF_TEST_URL || 'http://127.0.0.1:3100').replace(/\/+$/, '');
export const SCREENSHOT_DIR = path.resolve(__dirname, '..', '..', 'test-output');
const CHROMIUM = process.env.CHROMIUM_PATH || '/usr/bin/chromium';

export interface OpenBrowser {
  context: BrowserContext;
  page: Page;
  close(): Promise<void>;
}

export async function openBrowser(): Promise<OpenBrowser> {
  const profile = mkdtempSync(path.join(os.tmpdir(), 'modeshelf-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    baseURL: BASE_URL,
    viewport: { width: 1280, height: 860 },
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  });
  context.setDefaultTimeout(20_000);
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

export async function screenshot(page: Page, name: string): Promise<void> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`), fullPage: true });
}

export async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto('/signin');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}
