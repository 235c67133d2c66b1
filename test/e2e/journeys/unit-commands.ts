import { join } from 'node:path';
import type { Telemetry } from '../../../shared/contracts/wire';
import { connectUnit, publish, sample } from '../../helpers/fake-unit';
import { expectTrue, openedDialog, signIn, signOut, unitIdBySerial, type Journey } from '../harness';

/**
 * The unit view live: values follow the unit, every motion command asks for confirmation with the cautions, a hold
 * refuses motion, and a crew member holds the unit with a note and releases it after confirming nobody is within reach.
 */
export const unitCommandsJourney: Journey = {
  name: 'unit view and commands',
  async run({ page, base, stack, check, output }) {
    // A unit of its own (not the fleet board's), so that a hold or command left here changes nothing there.
    const unitSerial = 'QED-2402';
    const unitId = await unitIdBySerial(stack, unitSerial);
    const fake = await connectUnit(stack.broker.port, unitSerial);
    let seq = 1;
    const report = (over: Partial<Telemetry>) => publish(fake, unitSerial, 'telemetry', sample(seq++, Date.now(), over));
    try {
      await signIn(page, base, 'tech1@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      await publish(fake, unitSerial, 'status', { v: 1, online: true }, true);
      await report({ dcPowerW: 12, mode: 'scanning' });

      await check('the unit view shows live values, and every motion command asks for confirmation with the cautions', async () => {
        await page.goto(`${base}/units/${unitId}`);
        await page.getByRole('heading', { name: unitSerial }).waitFor();
        await page.getByTestId('unit-state').filter({ hasText: 'Scanning' }).waitFor();
        await report({ dcPowerW: 287, mode: 'settled' });
        await page.getByTestId('live-power').filter({ hasText: '287 W' }).waitFor({ timeout: 3000 });
        await page.getByTestId('cmd-stow').click();
        const dialog = await openedDialog(page);
        await dialog.getByText(`${unitSerial} will drive to its stow position`).waitFor();
        const caution = (await dialog.getByTestId('command-caution').textContent()) ?? '';
        for (const words of [
          'pinch',
          'stored mechanical energy',
          'DC voltage',
          'wind',
          'not a lockout',
          'Local codes and licensed practice',
        ]) {
          expectTrue(caution.includes(words), `caution mentions "${words}"`);
        }
        expectTrue(await dialog.getByTestId('confirm').isDisabled(), 'confirm disabled until the sender states nobody is within reach');
        await dialog.getByTestId('people-clear').click();
        await dialog
          .locator('[data-testid="confirm"]:enabled')
          .waitFor({ timeout: 2000 })
          .catch(() => undefined);
        expectTrue(await dialog.getByTestId('confirm').isEnabled(), 'confirm enabled after the check');
        await page.screenshot({ path: join(output, 'unit-command-confirm.png'), animations: 'disabled' });
        await dialog.getByTestId('confirm').click();
        await page.getByTestId('command-history').getByText('stow').waitFor();
        await page.screenshot({ path: join(output, 'unit-view.png'), fullPage: true, animations: 'disabled' });
      });

      await check('a unit on maintenance hold shows it and refuses motion in the panel', async () => {
        await report({ mode: 'held' });
        await page.getByTestId('hold-banner').waitFor({ timeout: 3000 });
        expectTrue(await page.getByTestId('cmd-scan').isDisabled(), 'scan disabled on hold');
        await page.getByText('The unit is on maintenance hold: motion is refused').first().waitFor();
        await page.screenshot({ path: join(output, 'unit-view-on-hold.png'), animations: 'disabled' });
        await report({ mode: 'settled' });
        await signOut(page, base);
      });

      await check(
        'a crew member puts their own hold on a unit with a note, sees it listed, and releases it after confirming nobody is within reach',
        async () => {
          await signIn(page, base, 'crew1@saltmarsh.example');
          await page.waitForURL(`${base}/my-work`);
          await page.goto(`${base}/units/${unitId}`);
          await page.getByTestId('holds-empty').waitFor();
          await page.getByTestId('cmd-hold').click();
          let dialog = await openedDialog(page);
          expectTrue(
            ((await dialog.getByTestId('command-caution').textContent()) ?? '').includes('not a lockout'),
            'hold caution says a hold is not a lockout',
          );
          await dialog.getByTestId('command-text').fill('Replacing the tilt drive');
          await dialog.getByTestId('confirm').click();
          const mine = page.getByTestId('hold-panel').locator('li', { hasText: 'Ines Calder' });
          await mine.getByText('Replacing the tilt drive').waitFor({ timeout: 3000 });
          await page.getByTestId('hold-banner').filter({ hasText: 'by Ines Calder' }).waitFor();
          expectTrue(await page.getByTestId('cmd-hold').isDisabled(), 'a second hold of the same person is not offered');
          await page.setViewportSize({ width: 360, height: 740 });
          await page.getByTestId('hold-panel').scrollIntoViewIfNeeded();
          await page.screenshot({ path: join(output, 'unit-view-hold-panel-phone.png'), animations: 'disabled' });
          await page.setViewportSize({ width: 1280, height: 800 });
          await page.emulateMedia({ colorScheme: 'dark' });
          await page.getByTestId('hold-panel').screenshot({ path: join(output, 'unit-view-hold-panel-dark.png'), animations: 'disabled' });
          await page.emulateMedia({ colorScheme: 'light' });

          await page.getByTestId('release-own').click();
          dialog = await openedDialog(page);
          const caution = (await dialog.getByTestId('command-caution').textContent()) ?? '';
          for (const words of ['move at once', 'not a lockout', 'lockout/tagout procedure', 'Local codes and licensed practice'])
            expectTrue(caution.includes(words), `release caution mentions "${words}"`);
          expectTrue(await dialog.getByTestId('confirm').isDisabled(), 'release disabled until the sender states nobody is within reach');
          await page.screenshot({ path: join(output, 'unit-release-hold-confirm.png'), animations: 'disabled' });
          await dialog.getByTestId('people-clear').click();
          await dialog.locator('[data-testid="confirm"]:enabled').waitFor({ timeout: 2000 });
          await dialog.getByTestId('confirm').click();
          await page.getByTestId('holds-empty').waitFor({ timeout: 3000 });
          await page.getByTestId('hold-banner').waitFor({ state: 'detached', timeout: 3000 });
          await signOut(page, base);
        },
      );
    } finally {
      await fake.endAsync().catch(() => undefined);
    }
  },
};
