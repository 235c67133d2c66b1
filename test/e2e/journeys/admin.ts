import { join } from 'node:path';
import { expectTrue, openedDialog, signIn, type Journey } from '../harness';

/** An admin adds a site through the form, meets a server-side field error, and adds a unit to the new site. */
export const adminJourney: Journey = {
  name: 'admin',
  async run({ page, base, check, output }) {
    const newSite = `Millbrook Museum Roof ${Date.now() % 100000}`;
    await check('admin adds a site through the form and sees it listed', async () => {
      await signIn(page, base, 'admin@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      await page.goto(`${base}/admin/sites`);
      await page.getByRole('table', { name: 'Sites' }).getByText('Harbourside Library Roof').waitFor();
      await page.getByTestId('add-site').click();
      const dialog = await openedDialog(page);
      await dialog.getByRole('heading', { name: 'Add a site' }).waitFor();
      // Out-of-range value first: the form must refuse it with the range in words.
      await dialog.getByTestId('latitudeDeg').fill('95');
      await dialog.getByTestId('latitudeDeg').blur();
      await dialog.getByText('Latitude must be from −90 to 90°.').waitFor();
      await dialog.getByTestId('name').fill(newSite);
      await dialog.getByTestId('ownerId').click();
      await page.getByRole('option', { name: 'Fenwick Lane Schools Trust' }).click();
      await dialog.getByTestId('latitudeDeg').fill('51.4521');
      await dialog.getByTestId('longitudeDeg').fill('-2.5910');
      await dialog.getByTestId('elevationM').fill('31');
      await dialog.getByTestId('albedo').fill('0.22');
      await dialog.getByTestId('timeZone').fill('Europe/Lon');
      await page.getByRole('option', { name: 'Europe/London' }).click();
      await page.screenshot({ path: join(output, 'admin-add-site.png') });
      await dialog.getByTestId('save').click();
      await dialog.waitFor({ state: 'detached' });
      await page.getByRole('table', { name: 'Sites' }).getByRole('link', { name: newSite }).waitFor();
      await page.goto(`${base}/sites`);
      await page.locator('ul.cards li.card h2', { hasText: newSite }).waitFor();
    });

    await check('admin adding a person with a taken email sees the server’s message under that field', async () => {
      await page.goto(`${base}/admin/people`);
      await page.getByRole('button', { name: 'Add a person' }).click();
      const dialog = await openedDialog(page);
      await dialog.getByLabel('Email address').fill('crew1@saltmarsh.example');
      await dialog.getByLabel('Full name').fill('Second Ines');
      await dialog.getByLabel('First password').fill('long-enough-password');
      await dialog.getByRole('button', { name: 'Add person' }).click();
      const emailError = dialog.locator('mat-form-field', { has: page.getByLabel('Email address') }).locator('mat-error');
      await emailError.waitFor();
      expectTrue(((await emailError.textContent()) ?? '').trim().length > 0, 'a message under the email field');
      expectTrue(await dialog.getByText('Some fields need attention').isVisible(), 'banner points to the fields');
      await page.screenshot({ path: join(output, 'admin-person-taken-email.png'), animations: 'disabled' });
      await dialog.getByRole('button', { name: 'Cancel' }).click();
      await dialog.waitFor({ state: 'detached' });
    });

    await check('admin adds a unit and is shown its device secret once', async () => {
      await page.goto(`${base}/admin/units`);
      await page.getByRole('button', { name: 'Add a unit' }).click();
      const dialog = await openedDialog(page);
      const serial = `E2E-${Date.now() % 1000000}`;
      await dialog.getByLabel('Serial number').fill(serial);
      await dialog.getByRole('combobox', { name: 'Site' }).click();
      await page.getByRole('option', { name: newSite }).click();
      await dialog.getByLabel('Firmware version').fill('2.4.1');
      await dialog.getByRole('button', { name: 'Add unit' }).click();
      const secretDialog = page.getByRole('dialog').filter({ hasText: 'will not be shown again' });
      await secretDialog.waitFor();
      const secret = ((await secretDialog.getByTestId('device-secret').textContent()) ?? '').trim();
      expectTrue(secret.length >= 16, `a device secret is shown (got ${secret.length} characters)`);
      await page.screenshot({ path: join(output, 'admin-device-secret.png'), animations: 'disabled' });
      const done = secretDialog.getByRole('button', { name: 'Done' });
      expectTrue(await done.isDisabled(), 'Done waits until the admin confirms the secret is stored');
      await secretDialog.getByText('I have stored the secret safely').click();
      await done.click();
      await secretDialog.waitFor({ state: 'detached' });
      await page.getByRole('table', { name: 'Tracker units' }).getByText(serial).waitFor();
    });
  },
};
