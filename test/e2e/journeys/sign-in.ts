import { join } from 'node:path';
import { expectEqual, expectTrue, type Journey } from '../harness';

/** Signing in: a signed-out visitor is sent to sign-in, a wrong password and empty fields are refused with words. */
export const signInJourney: Journey = {
  name: 'sign-in',
  async run({ page, base, check, output }) {
    await check('a signed-out visitor is sent to sign-in, keeping the page asked for', async () => {
      await page.goto(`${base}/admin/people`);
      await page.waitForURL(/\/sign-in\?returnUrl=%2Fadmin%2Fpeople$/);
      await page.getByRole('heading', { name: 'Sign in to Brightward' }).waitFor();
      await page.screenshot({ path: join(output, 'sign-in.png') });
    });

    await check('a wrong password shows the error and stays on sign-in', async () => {
      await page.goto(`${base}/sign-in`);
      await page.getByLabel('Email address').fill('admin@saltmarsh.example');
      await page.getByLabel('Password', { exact: true }).fill('not-the-password');
      await page.getByRole('button', { name: 'Sign in' }).click();
      const alert = page.getByTestId('sign-in-problem');
      await alert.waitFor();
      expectTrue(((await alert.textContent()) ?? '').includes('email address or password is not right'), 'wrong-password message');
      expectTrue(new URL(page.url()).pathname === '/sign-in', 'still on the sign-in page');
      await page.screenshot({ path: join(output, 'sign-in-wrong-password.png') });
    });

    await check('empty fields get a message each', async () => {
      await page.goto(`${base}/sign-in`);
      await page.getByRole('button', { name: 'Sign in' }).click();
      const errors = await page.locator('mat-error').allTextContents();
      expectEqual(
        errors.map((text) => text.trim()),
        ['Enter your email address.', 'Enter your password.'],
        'field messages',
      );
    });
  },
};
