import { join } from 'node:path';
import { expectEqual, signIn, signOut, siteIdByName, unitIdBySerial, type Journey } from '../harness';
import { insertTrapAlarm } from '../demo-data';

/** Owners see their own sites only: another owner's site is "not found", and alarms show only for their own units, read-only. */
export const ownerIsolationJourney: Journey = {
  name: 'owner isolation',
  async run({ page, base, stack, check, output }) {
    await check('an owner opening another owner’s site sees "not found"', async () => {
      await signIn(page, base, 'owner@quillmoor.example');
      await page.waitForURL(`${base}/portfolio`);
      const fenwickId = await siteIdByName(stack, 'Glasshouse Atrium');
      await page.goto(`${base}/sites/${fenwickId}`);
      await page.getByRole('heading', { name: 'Site not found' }).waitFor();
      await page.goto(`${base}/sites/${fenwickId}/statements`);
      await page.getByRole('heading', { name: 'Statement not found' }).waitFor();
      await signOut(page, base);
    });

    await check('an owner lands on their portfolio and reaches a site’s monthly statements, on a phone in the dark too', async () => {
      await signIn(page, base, 'owner@quillmoor.example');
      await page.waitForURL(`${base}/portfolio`);
      await page.getByRole('heading', { name: 'Your portfolio' }).waitFor();
      await page.getByRole('heading', { name: 'Harbourside Library Roof' }).waitFor();
      await page.getByRole('link', { name: 'Monthly statements' }).first().click();
      await page.getByRole('heading', { name: /^Monthly statement · / }).waitFor();
      await page.setViewportSize({ width: 360, height: 740 });
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.screenshot({ path: join(output, 'statement-phone-dark.png'), animations: 'disabled' });
      await page.goto(`${base}/portfolio`);
      await page.getByRole('link', { name: 'Monthly statements' }).first().waitFor();
      await page.screenshot({ path: join(output, 'portfolio-phone-dark.png'), animations: 'disabled', fullPage: true });
      await page.setViewportSize({ width: 1280, height: 800 });
      await page.emulateMedia({ colorScheme: 'light' });
      await signOut(page, base);
    });

    // An open alarm on a unit of the first owner's site; removed again so that no other journey sees it.
    const alarmId = await insertTrapAlarm(
      stack.db,
      await unitIdBySerial(stack, 'QHL-2402'),
      await siteIdByName(stack, 'Harbourside Library Roof'),
    );
    try {
      await check('owners see their own sites’ alarms read-only, and not other owners’', async () => {
        await signIn(page, base, 'owner@quillmoor.example');
        // Wait for the sign-in to land: navigating away at once can cancel it before the cookie is set.
        await page.waitForURL(`${base}/portfolio`);
        await page.goto(`${base}/alarms`);
        await page.getByTestId(`alarm-${alarmId}`).waitFor();
        expectEqual(await page.getByTestId(`ack-${alarmId}`).count(), 0, 'no acknowledge button for owners');
        await signOut(page, base);
        await signIn(page, base, 'owner@fenwicklane.example');
        // Wait for the sign-in to land: navigating away at once can cancel it before the cookie is set.
        await page.waitForURL(`${base}/portfolio`);
        await page.goto(`${base}/alarms`);
        await page.getByTestId('alarms-empty').waitFor();
        expectEqual(await page.getByTestId(`alarm-${alarmId}`).count(), 0, 'another owner does not see it');
        await page.setViewportSize({ width: 360, height: 740 });
        await page.emulateMedia({ colorScheme: 'dark' });
        await page.screenshot({ path: join(output, 'alarms-empty-phone-dark.png'), animations: 'disabled' });
        await page.setViewportSize({ width: 1280, height: 800 });
        await page.emulateMedia({ colorScheme: 'light' });
        await signOut(page, base);
      });
    } finally {
      await stack.db('alarms').where({ id: alarmId }).delete();
    }
  },
};
