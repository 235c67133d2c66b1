import { join } from 'node:path';
import type { Owner, Site } from '../../../shared/contracts/api';
import { apiAsPage, expectTrue, signIn, type Journey } from '../harness';

/** An admin finds a change in the audit log by filtering on its action. */
export const auditJourney: Journey = {
  name: 'audit',
  async run({ page, base, check, output }) {
    // The change to look for: a site added by this journey's admin (through the API; the admin journey uses the form).
    const newSite = `Audit Trail Pavilion ${Date.now() % 100000}`;
    await signIn(page, base, 'admin@saltmarsh.example');
    await page.waitForURL(`${base}/fleet`);
    const owners = await apiAsPage<Owner[]>(page, base, 'GET', '/api/owners');
    const owner = owners.find((o) => o.name === 'Fenwick Lane Schools Trust') ?? owners[0];
    if (!owner) throw new Error('the demo world has no owners');
    await apiAsPage<Site>(page, base, 'POST', '/api/sites', {
      ownerId: owner.id,
      name: newSite,
      latitudeDeg: 51.4521,
      longitudeDeg: -2.591,
      elevationM: 31,
      timeZone: 'Europe/London',
      albedo: 0.22,
    });

    await check('admin finds the site they added in the audit log, filtered by action', async () => {
      await page.goto(`${base}/admin/audit`);
      const table = page.getByRole('table', { name: 'Audit log entries, newest first' });
      await table.locator('tr.mat-mdc-row').first().waitFor();
      await page.getByTestId('filter-action').click();
      await page.getByRole('option', { name: 'Added a site' }).click();
      const row = table.locator('tr.mat-mdc-row', { hasText: `Site ${newSite}` });
      await row.waitFor();
      expectTrue(((await row.textContent()) ?? '').includes('Ada Kestrel'), 'the row names who added it');
      expectTrue((await table.locator('tr.mat-mdc-row').count()) >= 1, 'only "Added a site" rows are listed');
      for (const text of await table.locator('tr.mat-mdc-row').allTextContents())
        expectTrue(text.includes('Added a site'), `row is an "Added a site" entry: ${text}`);
      await page.screenshot({ path: join(output, 'admin-audit-log.png'), animations: 'disabled' });
    });
  },
};
