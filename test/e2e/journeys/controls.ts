import { join } from 'node:path';
import { expectTrue, signIn, siteIdByName, type Journey } from '../harness';

/**
 * An engineer tunes a site: changes a threshold with a reason and finds it in the history, puts it back, works out the
 * site's detector tilt, and replays the detectors over stored hours beside the stored alarms. Leaves the settings as found.
 */
export const controlsJourney: Journey = {
  name: 'controls',
  async run({ page, base, stack, check, output }) {
    await signIn(page, base, 'engineer@saltmarsh.example');
    await page.waitForURL(`${base}/fleet`);
    const roof = await siteIdByName(stack, 'Harbourside Library Roof');

    await check('a threshold changed with a reason shows in the history with who, old → new and why', async () => {
      await page.goto(`${base}/health-settings?site=${roof}`);
      const gust = page.getByTestId('input-stowGustMs');
      await gust.waitFor();
      await gust.fill('16');
      await page.getByTestId('settings-reason').fill('Gusty roof edge (browser check)');
      await page.getByTestId('settings-save').click();
      const entry = page.getByTestId('history-entry').filter({ hasText: 'Gusty roof edge (browser check)' });
      await entry.waitFor();
      const text = (await entry.textContent()) ?? '';
      expectTrue(
        text.includes('Ravi Lindqvist') && text.includes('Stow above gust: default (18 m/s) → 16 m/s'),
        `history entry (${text.slice(0, 160)})`,
      );
      await page.getByRole('heading', { name: 'Health settings', level: 1 }).scrollIntoViewIfNeeded();
      await page.screenshot({ path: join(output, 'health-settings.png'), animations: 'disabled' });
    });

    await check('putting the threshold back to its default is one more entry', async () => {
      await page.getByTestId('setting-stowGustMs').getByRole('button', { name: 'Use the default' }).click();
      await page.getByTestId('settings-reason').fill('Back to the default (browser check)');
      await page.getByTestId('settings-save').click();
      await page.getByTestId('history-entry').filter({ hasText: 'Back to the default (browser check)' }).waitFor();
      expectTrue((await page.getByTestId('input-stowGustMs').inputValue()) === '18', 'the default again');
    });

    await check("the site's detector tilt for the year is worked out on request", async () => {
      await page.getByTestId('tilt-compute').click();
      await page.locator('[data-testid="tilt-recommended"], [data-testid="tilt-none"]').first().waitFor({ timeout: 60_000 });
      expectTrue((await page.getByTestId('tilt-units').locator('li').count()) === 6, 'the six units of the roof listed');
    });

    await check('a replay over stored hours shows the run beside the stored alarms', async () => {
      await page.goto(`${base}/replay?site=${roof}`);
      await page.getByTestId('replay-unit-QHL-2401').waitFor();
      await page.getByTestId('replay-hours').fill('2');
      await page.getByTestId('replay-run').click();
      await page.getByTestId('replay-counts').waitFor({ timeout: 30_000 });
      await page.screenshot({ path: join(output, 'detector-replay.png'), fullPage: true, animations: 'disabled' });
    });
  },
};
