import { join } from 'node:path';
import type { TicketView } from '../../../shared/contracts/tickets';
import { apiAsPage, expectTrue, signIn, signOut, unitIdBySerial, type Journey } from '../harness';

/**
 * A work order on a phone: the control room opens and dispatches a ticket; the crew member finds it in "My work",
 * acknowledges it, checks in on site (the cautions are shown and must be confirmed; the unit is then held) and resolves
 * it with a closure, which lets go of the unit.
 */
export const ticketsJourney: Journey = {
  name: 'tickets',
  async run({ page, base, stack, check, output }) {
    const serial = 'FSC-2405'; // a unit no other journey commands
    const unitId = await unitIdBySerial(stack, serial);
    await signIn(page, base, 'tech1@saltmarsh.example');
    await page.waitForURL(`${base}/fleet`);
    const crew = (await apiAsPage<{ id: number; name: string }[]>(page, base, 'GET', '/api/tickets/assignees')).find(
      (a) => a.name === 'Ines Calder',
    )!;
    const opened = await apiAsPage<TicketView>(page, base, 'POST', '/api/tickets', {
      unitId,
      title: 'Tilt drive grinding',
      severity: 'P2',
    });
    await apiAsPage(page, base, 'POST', `/api/tickets/${opened.id}/transition`, { to: 'dispatched', assigneeId: crew.id });
    await page.goto(`${base}/tickets`);
    await page.getByTestId(`ticket-${opened.id}`).waitFor();
    await page.screenshot({ path: join(output, 'ticket-board.png'), animations: 'disabled' });
    await signOut(page, base);

    await check('a crew member acknowledges, checks in with the cautions confirmed and resolves a ticket on a phone', async () => {
      await page.setViewportSize({ width: 360, height: 740 });
      try {
        await signIn(page, base, 'crew1@saltmarsh.example');
        await page.waitForURL(`${base}/my-work`);
        await page.getByTestId(`ticket-${opened.id}`).click();
        await page.waitForURL(`${base}/tickets/${opened.id}`);
        await page.getByTestId('ticket-state').filter({ hasText: 'Dispatched' }).waitFor();

        await page.getByTestId('move-acknowledged').click();
        await page.getByTestId('move-submit').click();
        await page.getByTestId('ticket-state').filter({ hasText: 'Acknowledged by crew' }).waitFor();

        await page.getByTestId('move-on-site').click();
        const cautions = (await page.getByTestId('check-in-cautions').textContent()) ?? '';
        for (const words of ['Moving parts', 'not lockout/tagout', 'live whenever light', 'wind limit', 'Local electrical codes'])
          expectTrue(cautions.includes(words), `check-in cautions mention "${words}"`);
        expectTrue(await page.getByTestId('move-submit').isDisabled(), 'check-in waits for the cautions to be confirmed');
        await page.screenshot({ path: join(output, 'ticket-check-in-phone.png'), animations: 'disabled', fullPage: true });
        await page.getByTestId('move-confirm').click();
        await page.getByTestId('move-submit').click();
        await page.getByTestId('ticket-state').filter({ hasText: 'Crew on site' }).waitFor();
        const holds = await apiAsPage<{ active: { holder: { kind: string; id: number } }[] }>(
          page,
          base,
          'GET',
          `/api/units/${unitId}/holds`,
        );
        expectTrue(
          holds.active.some((h) => h.holder.kind === 'ticket' && h.holder.id === opened.id),
          'the unit is held by the ticket after check-in',
        );

        await page.getByTestId('move-resolved').click();
        await page.getByTestId('closure-component').fill('tilt drive');
        await page.getByTestId('closure-mode').fill('grinding gearbox');
        await page.getByTestId('closure-cause').fill('worn bearing');
        await page.getByTestId('closure-action').click();
        await page.getByRole('option', { name: 'replace' }).click();
        await page.getByTestId('move-note').fill('Bearing replaced, drive runs quietly.');
        await page.getByTestId('move-confirm').click();
        await page.screenshot({ path: join(output, 'ticket-resolve-phone.png'), animations: 'disabled', fullPage: true });
        await page.getByTestId('move-submit').click();
        await page.getByTestId('ticket-state').filter({ hasText: 'Resolved' }).waitFor();
        const after = await apiAsPage<{ held: boolean }>(page, base, 'GET', `/api/units/${unitId}/holds`);
        expectTrue(!after.held, 'the unit is released at check-out');
        await page.emulateMedia({ colorScheme: 'dark' });
        await page.screenshot({ path: join(output, 'ticket-resolved-phone-dark.png'), animations: 'disabled', fullPage: true });
        await page.emulateMedia({ colorScheme: 'light' });
        await signOut(page, base);
      } finally {
        await page.setViewportSize({ width: 1280, height: 800 });
      }
    });
  },
};
