import { join } from 'node:path';
import { expectEqual, expectTrue, signIn, siteIdByName, type Journey } from '../harness';

/** An engineer reads a site's modelled landscape (peaks, basins, the day's advice) and the survey editor refuses a bad horizon CSV. */
export const landscapeJourney: Journey = {
  name: 'landscape',
  async run({ page, base, stack, check, output }) {
    await signIn(page, base, 'engineer@saltmarsh.example');
    await page.waitForURL(`${base}/fleet`);

    await check('the landscape view shows two peaks with basins for the library roof on a summer morning', async () => {
      const roof = await siteIdByName(stack, 'Harbourside Library Roof');
      await page.goto(`${base}/landscape?site=${roof}&date=2026-06-21&time=09:00`);
      await page.getByTestId('landscape-summary').filter({ hasText: '2 peaks' }).waitFor({ timeout: 15_000 });
      const rows = page.getByTestId('maxima-table').locator('tbody tr');
      expectEqual(await rows.count(), 2, 'peaks listed');
      expectTrue(((await rows.nth(0).textContent()) ?? '').includes('Modelled best'), 'global peak first');
      await page.getByTestId('day-recommendation').waitFor({ timeout: 15_000 });
      await page.waitForTimeout(800);
      await page.screenshot({ path: join(output, 'landscape-view.png'), fullPage: true, animations: 'disabled' });
    });

    await check('a horizon CSV with bad rows is refused line by line and nothing changes', async () => {
      await page.getByTestId('horizon-csv').setInputFiles({
        name: 'horizon.csv',
        mimeType: 'text/csv',
        buffer: Buffer.from('azimuth,elevation\r\n0,5\r\n400,3\r\n90,x\r\n'),
      });
      const problems = page.getByTestId('csv-problems');
      await problems.waitFor();
      const text = (await problems.textContent()) ?? '';
      expectTrue(text.includes('Line 3') && text.includes('Line 4'), `bad lines named (${text.slice(0, 120)})`);
      expectTrue(await page.getByTestId('survey-save').isDisabled(), 'nothing to save');
      await page
        .getByTestId('survey-problems')
        .waitFor({ state: 'detached' })
        .catch(() => undefined);
      await page.getByTestId('csv-problems').scrollIntoViewIfNeeded();
      await page.screenshot({ path: join(output, 'survey-editor-bad-csv.png'), animations: 'disabled' });
    });
  },
};
