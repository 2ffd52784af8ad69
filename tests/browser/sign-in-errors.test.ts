import { describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '@/db/seeds/01_demo_people';
import { openBrowser, screenshot, signIn } from './browser';

describe('sign-in form', () => {
  it('says clearly when the password is wrong, and stays on the form', async () => {
    const browser = await openBrowser();
    try {
      const { page } = browser;
      await signIn(page, DEMO_PEOPLE[2].email, 'not-the-reviewer-password');
      const error = page.getByTestId('signin-error');
      await expect.poll(() => error.textContent()).toBe('Wrong e-mail or password.');
      expect(new URL(page.url()).pathname).toBe('/signin');
      await screenshot(page, 'signin-wrong-password');
    } finally {
      await browser.close();
    }
  });
});
