import { join } from 'node:path';
import { ALL_SITES, DEMO_USERS, expectEqual, expectTrue, signIn, signOut, type Journey, type RoleName } from '../harness';

/** The navigation each role gets (the pages it may open), in order. */
const NAV: Record<RoleName, string[]> = {
  admin: [
    'Fleet board',
    'Alarms',
    'Tickets',
    'Sites',
    'Trace explorer',
    'Landscape',
    'Health settings',
    'Detector replay',
    'Notifications',
    'People',
    'Owners',
    'Site setup',
    'Units and credentials',
    'Outbox',
    'Audit log',
  ],
  engineer: [
    'Fleet board',
    'Alarms',
    'Tickets',
    'Sites',
    'Trace explorer',
    'Landscape',
    'Health settings',
    'Detector replay',
    'Notifications',
  ],
  technician: ['Fleet board', 'Alarms', 'Tickets', 'Sites', 'Trace explorer', 'Health settings', 'Detector replay', 'Notifications'],
  crew: ['My work', 'Fleet board', 'Alarms', 'Tickets', 'Sites', 'Notifications'],
  owner: ['Portfolio', 'Alarms', 'Tickets', 'Sites', 'Notifications'],
};

/** Every demo person signs in and sees only their pages and sites; everyone but admins is refused the admin pages. */
export const rolesJourney: Journey = {
  name: 'roles',
  async run({ page, base, stack, check, output }) {
    const shotsTaken = new Set<RoleName>();
    for (const user of DEMO_USERS) {
      await check(`${user.role} ${user.email} signs in and sees only their pages and sites`, async () => {
        await signIn(page, base, user.email);
        // Crews land on their work, the control room on the fleet board, owners on their portfolio.
        await page.waitForURL(`${base}/${user.role === 'owner' ? 'portfolio' : user.role === 'crew' ? 'my-work' : 'fleet'}`);
        await page.goto(`${base}/sites`);
        await page.getByTestId('main-nav').locator('a').first().waitFor();
        const nav = (await page.getByTestId('main-nav').locator('a [matlistitemtitle]').allTextContents()).map((t) => t.trim());
        expectEqual(nav, NAV[user.role], 'navigation items');
        const chip = ((await page.getByTestId('role-chip').textContent()) ?? '').trim();
        expectTrue(chip.endsWith(user.roleLabel), `role chip shows "${user.roleLabel}" (got "${chip}")`);
        expectTrue(((await page.getByTestId('user-menu').textContent()) ?? '').includes(user.name), 'user name in the toolbar');
        await page.locator('ul.cards li.card').first().waitFor();
        const sites = (await page.locator('ul.cards li.card h2').allTextContents()).map((t) => t.trim()).sort();
        if (user.sites) {
          // Exactly this owner's sites: the demo world's, and any another journey added for the same owner.
          const owned = (await stack
            .db('sites')
            .join('users', 'users.owner_id', 'sites.owner_id')
            .where('users.email', user.email)
            .pluck('sites.name')) as string[];
          expectEqual(sites, [...owned].sort(), 'sites of this owner');
          for (const name of user.sites) expectTrue(sites.includes(name), `site "${name}" listed`);
        } else {
          for (const name of ALL_SITES) expectTrue(sites.includes(name), `site "${name}" listed`);
        }
        if (!shotsTaken.has(user.role)) {
          shotsTaken.add(user.role);
          await page.screenshot({ path: join(output, `${user.role}.png`), animations: 'disabled' });
        }
      });

      if (user.email === 'tech1@saltmarsh.example') {
        await check('a technician opens a site and sees its units, read-only', async () => {
          await page.goto(`${base}/sites`);
          await page.locator('ul.cards li.card a', { hasText: 'Harbourside Library Roof' }).click();
          await page.getByRole('heading', { name: 'Harbourside Library Roof' }).waitFor();
          const table = page.getByRole('table', { name: 'Tracker units of this site' });
          await table.locator('tr.mat-mdc-row').first().waitFor();
          const rows = await table.locator('tr.mat-mdc-row').count();
          expectTrue(rows >= 1, `unit rows shown (${rows})`);
          expectTrue((await page.getByRole('button', { name: /edit/i }).count()) === 0, 'no edit buttons');
          expectTrue((await page.getByRole('link', { name: 'Manage units' }).count()) === 0, 'no link to unit management');
          await page.screenshot({ path: join(output, 'technician-site.png'), animations: 'disabled' });
        });
      }

      if (user.role !== 'admin') {
        await check(`${user.role} ${user.email} is shown no-access on an admin page`, async () => {
          await page.goto(`${base}/admin/units`);
          await page.getByRole('heading', { name: 'No access to this page' }).waitFor();
          expectTrue(new URL(page.url()).pathname === '/no-access', 'on /no-access');
        });
      }

      await check(`${user.role} ${user.email} signs out`, async () => {
        await signOut(page, base);
        await page.goto(`${base}/sites`);
        await page.waitForURL(/\/sign-in\?returnUrl=%2Fsites$/);
      });
      // The next person starts signed out even when a check above failed half-way.
      await page.context().clearCookies();
    }
  },
};
