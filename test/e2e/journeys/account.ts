import { join } from 'node:path';
import { apiAsPage, PASSWORD, signIn, signOut, type Journey } from '../harness';

/** A field crew member changes their own password on a phone; only the new one signs in afterwards. */
export const accountJourney: Journey = {
  name: 'account',
  async run({ page, base, check, output }) {
    // A crew member of its own, so that no other journey's demo sign-in depends on whether this one ran.
    const email = `crew-${Date.now() % 1_000_000}@saltmarsh.example`;
    await signIn(page, base, 'admin@saltmarsh.example');
    await page.waitForURL(`${base}/fleet`);
    await apiAsPage(page, base, 'POST', '/api/users', { email, name: 'Lena Farrow', role: 'crew', ownerId: null, password: PASSWORD });
    await signOut(page, base);

    await check(
      'a field crew member changes their own password from the account menu on a phone, and only the new one signs in',
      async () => {
        const newPassword = 'lena-has-a-new-password';
        await page.setViewportSize({ width: 360, height: 740 });
        try {
          await signIn(page, base, email);
          await page.waitForURL(`${base}/my-work`);
          await page.getByTestId('user-menu').click();
          await page.getByTestId('change-password').click();
          await page.waitForURL(`${base}/account/password`);
          await page.getByLabel('Current password').fill(PASSWORD);
          await page.getByLabel('New password', { exact: true }).fill(newPassword);
          await page.getByLabel('New password again').fill(newPassword);
          await page.getByRole('button', { name: 'Change password' }).click();
          await page.getByTestId('password-changed').waitFor();
          await page.screenshot({ path: join(output, 'change-password-phone.png'), animations: 'disabled' });
          await page.emulateMedia({ colorScheme: 'dark' });
          await page.screenshot({ path: join(output, 'change-password-phone-dark.png'), animations: 'disabled' });
          await page.emulateMedia({ colorScheme: 'light' });
          await signOut(page, base);
          await signIn(page, base, email);
          await page.getByTestId('sign-in-problem').waitFor();
          await page.getByLabel('Password', { exact: true }).fill(newPassword);
          await page.getByRole('button', { name: 'Sign in' }).click();
          await page.waitForURL(`${base}/my-work`);
          await signOut(page, base);
        } finally {
          await page.setViewportSize({ width: 1280, height: 800 });
        }
      },
    );
  },
};
