import { join } from 'node:path';
import { expectTrue, signIn, signOut, type Journey } from '../harness';

/** The shell on a phone (navigation drawer) and in dark colours, with the colour toggle overriding the device. */
export const shellJourney: Journey = {
  name: 'shell',
  async run({ page, base, check, output }) {
    await signIn(page, base, 'admin@saltmarsh.example');
    await page.waitForURL(`${base}/fleet`);

    await check('the shell works on a 360 px wide phone screen', async () => {
      await page.setViewportSize({ width: 360, height: 740 });
      await page.goto(`${base}/sites`);
      await page.getByRole('button', { name: 'Open navigation' }).click();
      await page.getByTestId('main-nav').getByRole('link', { name: 'People' }).click();
      await page.getByRole('heading', { name: 'People' }).waitFor();
      await page.screenshot({ path: join(output, 'admin-phone-people.png'), animations: 'disabled' });
      await page.setViewportSize({ width: 1280, height: 800 });
    });

    await check('dark colours follow the device, and the toggle overrides them', async () => {
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.goto(`${base}/sites`);
      await page.locator('ul.cards li.card').first().waitFor();
      const darkBackground = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      await page.screenshot({ path: join(output, 'admin-dark.png'), animations: 'disabled' });
      await page.getByRole('button', { name: /^Colours: Follow device/ }).click();
      await page.getByRole('button', { name: /^Colours: Light/ }).waitFor();
      const lightBackground = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      expectTrue(darkBackground !== lightBackground, `background changes (${darkBackground} vs ${lightBackground})`);
      await page.reload();
      await page.getByRole('button', { name: /^Colours: Light/ }).waitFor();
      // Back to following the device for whoever uses this profile next.
      await page.getByRole('button', { name: /^Colours: Light/ }).click();
      await page.getByRole('button', { name: /^Colours: Dark/ }).click();
      await page.getByRole('button', { name: /^Colours: Follow device/ }).waitFor();
      await page.emulateMedia({ colorScheme: 'light' });
      await signOut(page, base);
    });
  },
};
