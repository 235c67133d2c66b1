import { join } from 'node:path';
import { expectEqual, expectTrue, openedDialog, signIn, signOut, siteIdByName, unitIdBySerial, type Journey } from '../harness';
import { insertFinishedScan, insertTrapAlarm } from '../demo-data';

/**
 * Alarm triage: a technician sees a trap alarm on the fleet board and the alarms screen and acknowledges it, then reads
 * the trap finding and the scan result in the unit view, where going to the brightest orientation asks for confirmation.
 */
export const alarmsJourney: Journey = {
  name: 'alarms',
  async run({ page, base, stack, check, output }) {
    const alarmUnit = await unitIdBySerial(stack, 'QHL-2401');
    const alarmId = await insertTrapAlarm(stack.db, alarmUnit, await siteIdByName(stack, 'Harbourside Library Roof'));
    await insertFinishedScan(stack.db, alarmUnit, 'e2e-scan-1');

    await check('a technician sees the alarm on the fleet board and the alarms screen, and acknowledges it', async () => {
      await signIn(page, base, 'tech1@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      const badge = page.getByTestId('alarm-badge-QHL-2401');
      await badge.waitFor();
      expectTrue(((await badge.textContent()) ?? '').includes('P2 Stuck on a lesser peak'), 'fleet badge names severity and kind in words');
      await page.getByRole('button', { name: /With open alarms/ }).click();
      // Units with an open alarm: this journey's, and any another journey left open.
      const open = (await stack
        .db('alarms')
        .whereNot({ state: 'cleared' })
        .whereNotNull('unit_id')
        .countDistinct({ n: 'unit_id' })
        .first()) as { n: number | string };
      const openUnits = Number(open.n);
      await page
        .locator('tr[data-unit]')
        .nth(openUnits)
        .waitFor({ state: 'detached', timeout: 3000 })
        .catch(() => undefined);
      expectEqual(await page.locator('tr[data-unit]').count(), openUnits, 'the open-alarms filter leaves the units with open alarms');
      await page.locator('tr[data-unit]', { has: page.getByTestId('alarm-badge-QHL-2401') }).waitFor();
      await page.getByRole('link', { name: 'Alarms' }).first().click();
      await page.waitForURL(`${base}/alarms`);
      const card = page.getByTestId(`alarm-${alarmId}`);
      await card.waitFor();
      expectTrue(
        ((await page.getByTestId(`alarm-sev-${alarmId}`).textContent()) ?? '').includes('P2 High'),
        'severity shown by code and word',
      );
      await card.locator('dt', { hasText: 'Modelled brightest' }).waitFor();
      await card.locator('dd', { hasText: '450 W/m² (52.3 %)' }).waitFor();
      expectTrue(
        ((await page.getByTestId(`alarm-traces-${alarmId}`).getAttribute('href')) ?? '').includes(`/traces?units=${alarmUnit}`),
        'links to the trace explorer at the alarm time',
      );
      await page.screenshot({ path: join(output, 'alarms.png'), fullPage: true, animations: 'disabled' });
      await page.getByTestId(`ack-${alarmId}`).click();
      await page.getByTestId(`alarm-status-${alarmId}`).filter({ hasText: 'Acknowledged by Mara Okonjo' }).waitFor({ timeout: 3000 });
      const row = (await stack.db('alarms').where({ id: alarmId }).first('acknowledged_at', 'acknowledged_by')) as
        Record<string, unknown> | undefined;
      expectTrue(row?.['acknowledged_at'] != null && row?.['acknowledged_by'] != null, 'acknowledgement stored with who and when');
      await page.screenshot({ path: join(output, 'alarms-acknowledged.png'), animations: 'disabled' });
    });

    await check(
      'the unit view shows the trap finding and the scan result, and going to the brightest orientation asks for confirmation',
      async () => {
        await page.goto(`${base}/units/${alarmUnit}`);
        await page.getByTestId('trap-finding').filter({ hasText: 'tilt 30°, azimuth 178°' }).waitFor();
        const facts = page.getByTestId('scan-facts');
        await facts.waitFor();
        expectTrue(((await facts.textContent()) ?? '').includes('Brightest measured'), 'scan result states the measured best');
        await page.getByTestId('goto-brightest').click();
        const dialog = await openedDialog(page);
        await dialog.getByText('will turn its panel to tilt').waitFor();
        expectTrue(((await dialog.getByTestId('command-caution').textContent()) ?? '').includes('not a lockout'), 'goto shows the caution');
        expectTrue(await dialog.getByTestId('confirm').isDisabled(), 'goto needs the people-clear check');
        await dialog.getByRole('button', { name: 'Cancel' }).click();
        await dialog.waitFor({ state: 'detached' });
        await page.getByTestId('scan-panel').scrollIntoViewIfNeeded();
        await page.waitForTimeout(600);
        await page.screenshot({ path: join(output, 'unit-alarm.png'), fullPage: true, animations: 'disabled' });
        await signOut(page, base);
      },
    );
  },
};
