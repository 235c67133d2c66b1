import { join } from 'node:path';
import type { Telemetry } from '../../../shared/contracts/wire';
import { connectUnit, publish, sample } from '../../helpers/fake-unit';
import { expectEqual, expectTrue, signIn, signOut, unitIdBySerial, type Journey } from '../harness';

/** The fleet board follows a unit live, narrows by search, and works on a phone and in dark colours (with the unit view). */
export const fleetBoardJourney: Journey = {
  name: 'fleet board',
  async run({ page, base, stack, check, output }) {
    const unitSerial = 'QED-2401';
    const unitId = await unitIdBySerial(stack, unitSerial);
    const fake = await connectUnit(stack.broker.port, unitSerial);
    let seq = 1;
    const report = (over: Partial<Telemetry>) => publish(fake, unitSerial, 'telemetry', sample(seq++, Date.now(), over));
    try {
      await check('a technician sees a unit change state live on the fleet board within 3 s', async () => {
        await signIn(page, base, 'tech1@saltmarsh.example');
        await page.waitForURL(`${base}/fleet`);
        await page.getByTestId('link-state').filter({ hasText: 'Live' }).waitFor();
        await page.getByTestId(`state-${unitSerial}`).waitFor();
        await publish(fake, unitSerial, 'status', { v: 1, online: true }, true);
        let started = Date.now();
        await report({ dcPowerW: 321, mode: 'settled' });
        await page.getByTestId(`power-${unitSerial}`).filter({ hasText: '321 W' }).waitFor({ timeout: 3000 });
        const firstMs = Date.now() - started;
        await page.waitForTimeout(1100); // the hub sends each unit at most once a second
        started = Date.now();
        await report({ dcPowerW: 12, mode: 'scanning' });
        await page.getByTestId(`state-${unitSerial}`).filter({ hasText: 'Scanning' }).waitFor({ timeout: 3000 });
        const secondMs = Date.now() - started;
        expectTrue(firstMs < 3000 && secondMs < 3000, `seen after ${firstMs} ms and ${secondMs} ms`);
        console.log(`        live change seen after ${firstMs} ms and ${secondMs} ms`);
        await page.getByTestId('fleet-search').fill('QED');
        expectEqual(await page.locator('tr[data-unit]').count(), 6, 'search narrows the board to one site');
        await page.getByTestId('fleet-search').fill('');
        await page.screenshot({ path: join(output, 'fleet-board.png'), animations: 'disabled' });
      });

      await check('the fleet board and unit view work on a 360 px phone screen and in dark colours', async () => {
        await page.setViewportSize({ width: 360, height: 740 });
        await page.goto(`${base}/fleet`);
        await page.getByTestId(`state-${unitSerial}`).waitFor();
        await page.screenshot({ path: join(output, 'fleet-board-phone.png'), animations: 'disabled' });
        await page.setViewportSize({ width: 1280, height: 800 });
        await page.emulateMedia({ colorScheme: 'dark' });
        await page.goto(`${base}/units/${unitId}`);
        await page.getByRole('heading', { name: unitSerial }).waitFor();
        await page.waitForTimeout(800);
        await page.screenshot({ path: join(output, 'unit-view-dark.png'), animations: 'disabled' });
        await page.emulateMedia({ colorScheme: 'light' });
        await signOut(page, base);
      });
    } finally {
      await fake.endAsync().catch(() => undefined);
    }
  },
};
