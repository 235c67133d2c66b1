import { join } from 'node:path';
import { expectTrue, signIn, signOut, unitIdBySerial, type Journey } from '../harness';

/**
 * A crew member's bell counts up live when a technician dispatches a ticket to them, and opens the ticket; the admin
 * finds the e-mail in the Outbox (this run has no mail service, so it shows the failed try and its error).
 */
export const notificationsJourney: Journey = {
  name: 'notifications',
  async run({ page, base, stack, check, output }) {
    const crew = (await stack.db('users').where({ email: 'crew2@saltmarsh.example' }).first('id')) as { id: number };
    const tech = (await stack.db('users').where({ email: 'tech2@saltmarsh.example' }).first('id')) as { id: number };
    const by = { id: tech.id, role: 'technician' as const, ownerId: null };
    let ticketId = 0;

    await check('the bell counts a new assignment live and opens its ticket', async () => {
      await signIn(page, base, 'crew2@saltmarsh.example');
      await page.waitForURL(`${base}/my-work`);
      const bell = page.getByTestId('notification-bell');
      const before = Number((await bell.getAttribute('aria-label'))!.match(/(\d+) unread/)?.[1] ?? 0);
      const t = await stack.tickets.create(by, { unitId: await unitIdBySerial(stack, 'QED-2405'), title: 'Bell check', severity: 'P3' });
      ticketId = t.id;
      await stack.tickets.transition(by, t.id, { to: 'dispatched', assigneeId: crew.id });
      await page.getByRole('button', { name: `Notifications: ${before + 1} unread` }).waitFor({ timeout: 10_000 });
      await bell.click();
      const item = page.getByTestId(/^notification-\d+$/).filter({ hasText: `Ticket ${t.id} (P3) assigned to you: Bell check` });
      await item.waitFor();
      await page.screenshot({ path: join(output, 'crew-bell.png'), animations: 'disabled' });
      await item.click();
      await page.waitForURL(`${base}/tickets/${t.id}`);
      await page.getByRole('button', { name: before ? `Notifications: ${before} unread` : 'Notifications: none unread' }).waitFor();
      await signOut(page, base);
    });

    await check('the admin finds the message in the Outbox with its delivery', async () => {
      await signIn(page, base, 'admin@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      await page.goto(`${base}/admin/outbox`);
      const row = page.locator('tr.mat-mdc-row').filter({ hasText: `Ticket ${ticketId} (P3) assigned to you: Bell check` });
      await row.waitFor();
      const text = (await row.innerText()).replace(/\s+/g, ' ');
      expectTrue(text.includes('crew2@saltmarsh.example'), `the row names the crew member (${text})`);
      expectTrue(/Waiting to go|Not delivered|Sent/.test(text), `the row shows the delivery (${text})`);
      await row.getByText(`Ticket ${ticketId} (P3) assigned to you: Bell check`).click();
      expectTrue(
        (await row.locator('pre').innerText()).includes('A software hold is not lockout/tagout'),
        'the message carries the cautions',
      );
      await page.screenshot({ path: join(output, 'admin-outbox.png'), animations: 'disabled' });
      await signOut(page, base);
    });

    await check('a technician chooses what to hear about and sees the on-call rota', async () => {
      await signIn(page, base, 'tech2@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      await page.getByTestId('notification-bell').click();
      await page.getByTestId('notification-settings-link').click();
      await page.waitForURL(`${base}/notifications`);
      await page.getByTestId('settings-form').waitFor();
      await page.getByRole('heading', { name: 'On-call rota' }).waitFor();
      await page.getByTestId('save-settings').click();
      await page.getByText('Notification settings saved.').waitFor();
      await page.screenshot({ path: join(output, 'technician-notifications.png'), animations: 'disabled' });
      await signOut(page, base);
    });
  },
};
