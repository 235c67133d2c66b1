/**
 * End-to-end checks of the dashboard in headless Chromium against the real server on a fresh,
 * seeded test database. Run by `npm test` (which starts the test MariaDB and sets BW_DB_*), after
 * `npm run build`. Screenshots go to test/.output/e2e/. Prints "N passed, M failed".
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { startTestStack } from '../helpers/test-stack';
import { connectUnit, publish, sample } from '../helpers/fake-unit';
import type { Telemetry } from '../../shared/contracts/wire';
import { insertDayOfTelemetry } from './demo-data';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const OUTPUT = join(ROOT, 'test/.output/e2e');
const CHROMIUM = process.env['BW_CHROMIUM'] ?? '/usr/bin/chromium';
const PASSWORD = 'brightward-demo';

type RoleName = 'admin' | 'engineer' | 'technician' | 'crew' | 'owner';

interface DemoUser {
  email: string;
  name: string;
  role: RoleName;
  roleLabel: string;
  /** Exactly the sites this user must see; null = every site of the demo world. */
  sites: string[] | null;
}

const ALL_SITES = ['Eastfield Depot Yard', 'Fenwick Lane School Courtyard', 'Glasshouse Atrium', 'Harbourside Library Roof'];
const DEMO_USERS: DemoUser[] = [
  { email: 'admin@saltmarsh.example', name: 'Ada Kestrel', role: 'admin', roleLabel: 'Administrator', sites: null },
  { email: 'engineer@saltmarsh.example', name: 'Ravi Lindqvist', role: 'engineer', roleLabel: 'Engineer', sites: null },
  { email: 'tech1@saltmarsh.example', name: 'Mara Okonjo', role: 'technician', roleLabel: 'O&M technician', sites: null },
  { email: 'tech2@saltmarsh.example', name: 'Tomasz Velde', role: 'technician', roleLabel: 'O&M technician', sites: null },
  { email: 'crew1@saltmarsh.example', name: 'Ines Calder', role: 'crew', roleLabel: 'Field crew', sites: null },
  { email: 'crew2@saltmarsh.example', name: 'Kwame Ruiz', role: 'crew', roleLabel: 'Field crew', sites: null },
  {
    email: 'owner@quillmoor.example',
    name: 'Priya Halvorsen',
    role: 'owner',
    roleLabel: 'Owner',
    sites: ['Eastfield Depot Yard', 'Harbourside Library Roof'],
  },
  {
    email: 'owner@fenwicklane.example',
    name: 'Jonah Whitcombe',
    role: 'owner',
    roleLabel: 'Owner',
    sites: ['Fenwick Lane School Courtyard', 'Glasshouse Atrium'],
  },
];

const NAV: Record<RoleName, string[]> = {
  admin: ['Fleet board', 'Alarms', 'Sites', 'Trace explorer', 'Landscape', 'People', 'Owners', 'Site setup', 'Units and credentials', 'Audit log'],
  engineer: ['Fleet board', 'Alarms', 'Sites', 'Trace explorer', 'Landscape'],
  technician: ['Fleet board', 'Alarms', 'Sites', 'Trace explorer'],
  crew: ['Fleet board', 'Alarms', 'Sites'],
  owner: ['Alarms', 'Sites'],
};

class CheckFailed extends Error {}

function expectEqual<T>(actual: T, expected: T, what: string): void {
  const a = JSON.stringify(actual);
  const e = JSON.stringify(expected);
  if (a !== e) throw new CheckFailed(`${what}: expected ${e}, got ${a}`);
}

function expectTrue(condition: boolean, what: string): void {
  if (!condition) throw new CheckFailed(what);
}

async function main(): Promise<number> {
  const index = join(ROOT, 'dist/web/browser/index.html');
  if (!existsSync(index)) {
    console.error(`No built dashboard at ${index}. Run "npm run build" first.`);
    return 1;
  }
  if (!existsSync(CHROMIUM)) {
    console.error(`No Chromium at ${CHROMIUM}. Install Debian's "chromium" package (apt-get install chromium) or set BW_CHROMIUM.`);
    return 1;
  }
  mkdirSync(OUTPUT, { recursive: true });

  const stack = await startTestStack({ seed: true });
  const base = stack.url;
  const profile = mkdtempSync(join(tmpdir(), 'bw-e2e-chromium-'));
  let context: BrowserContext | undefined;
  let passed = 0;
  let failed = 0;
  const offMachine: string[] = [];

  try {
    context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      headless: true,
      viewport: { width: 1280, height: 800 },
      args: [
        '--headless',
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    });
    context.setDefaultTimeout(10_000);
    const origin = new URL(base).origin;
    context.on('request', (request) => {
      const url = request.url();
      if (!url.startsWith(origin) && !url.startsWith('data:') && !url.startsWith('blob:')) offMachine.push(url);
    });
    // The built dashboard must run under the server's content security policy: any refusal shows as a console message.
    const cspViolations: string[] = [];
    context.on('console', (message) => {
      if (/Content Security Policy/i.test(message.text())) cspViolations.push(message.text());
    });
    const page = context.pages()[0] ?? (await context.newPage());

    async function check(name: string, body: () => Promise<void>): Promise<void> {
      const started = Date.now();
      try {
        await body();
        passed++;
        console.log(`  ok    ${name} (${Date.now() - started} ms)`);
      } catch (error) {
        failed++;
        const shot = join(OUTPUT, `failed-${passed + failed}.png`);
        await page.screenshot({ path: shot, fullPage: true }).catch(() => undefined);
        console.log(`  FAIL  ${name}\n        ${error instanceof Error ? error.message.split('\n')[0] : String(error)}\n        screenshot: ${shot}`);
      }
    }

    const shotsTaken = new Set<RoleName>();

    await check('a signed-out visitor is sent to sign-in, keeping the page asked for', async () => {
      await page.goto(`${base}/admin/people`);
      await page.waitForURL(/\/sign-in\?returnUrl=%2Fadmin%2Fpeople$/);
      await page.getByRole('heading', { name: 'Sign in to Brightward' }).waitFor();
      await page.screenshot({ path: join(OUTPUT, 'sign-in.png') });
    });

    await check('a wrong password shows the error and stays on sign-in', async () => {
      await page.goto(`${base}/sign-in`);
      await page.getByLabel('Email address').fill('admin@saltmarsh.example');
      await page.getByLabel('Password', { exact: true }).fill('not-the-password');
      await page.getByRole('button', { name: 'Sign in' }).click();
      const alert = page.getByTestId('sign-in-problem');
      await alert.waitFor();
      expectTrue(((await alert.textContent()) ?? '').includes('email address or password is not right'), 'wrong-password message');
      expectTrue(new URL(page.url()).pathname === '/sign-in', 'still on the sign-in page');
      await page.screenshot({ path: join(OUTPUT, 'sign-in-wrong-password.png') });
    });

    await check('empty fields get a message each', async () => {
      await page.goto(`${base}/sign-in`);
      await page.getByRole('button', { name: 'Sign in' }).click();
      const errors = await page.locator('mat-error').allTextContents();
      expectEqual(
        errors.map((text) => text.trim()),
        ['Enter your email address.', 'Enter your password.'],
        'field messages',
      );
    });

    for (const user of DEMO_USERS) {
      await check(`${user.role} ${user.email} signs in and sees only their pages and sites`, async () => {
        await signIn(page, base, user.email);
        // Staff land on the fleet board, owners on their sites.
        await page.waitForURL(`${base}/${user.role === 'owner' ? 'sites' : 'fleet'}`);
        if (user.role !== 'owner') await page.goto(`${base}/sites`);
        await page.getByTestId('main-nav').locator('a').first().waitFor();
        const nav = (await page.getByTestId('main-nav').locator('a [matlistitemtitle]').allTextContents()).map((t) => t.trim());
        expectEqual(nav, NAV[user.role], 'navigation items');
        const chip = ((await page.getByTestId('role-chip').textContent()) ?? '').trim();
        expectTrue(chip.endsWith(user.roleLabel), `role chip shows "${user.roleLabel}" (got "${chip}")`);
        expectTrue(((await page.getByTestId('user-menu').textContent()) ?? '').includes(user.name), 'user name in the toolbar');
        await page.locator('ul.cards li.card').first().waitFor();
        const sites = (await page.locator('ul.cards li.card h2').allTextContents()).map((t) => t.trim()).sort();
        if (user.sites) {
          expectEqual(sites, user.sites, 'sites of this owner');
        } else {
          for (const name of ALL_SITES) expectTrue(sites.includes(name), `site "${name}" listed`);
        }
        if (!shotsTaken.has(user.role)) {
          shotsTaken.add(user.role);
          await page.screenshot({ path: join(OUTPUT, `${user.role}.png`), animations: 'disabled' });
        }
      });

      if (user.email === 'tech1@saltmarsh.example') {
        await check('a technician opens a site and sees its units, read-only', async () => {
          await page.locator('ul.cards li.card a', { hasText: 'Harbourside Library Roof' }).click();
          await page.getByRole('heading', { name: 'Harbourside Library Roof' }).waitFor();
          const table = page.getByRole('table', { name: 'Tracker units of this site' });
          await table.locator('tr.mat-mdc-row').first().waitFor();
          const rows = await table.locator('tr.mat-mdc-row').count();
          expectTrue(rows >= 1, `unit rows shown (${rows})`);
          expectTrue((await page.getByRole('button', { name: /edit/i }).count()) === 0, 'no edit buttons');
          expectTrue((await page.getByRole('link', { name: 'Manage units' }).count()) === 0, 'no link to unit management');
          await page.screenshot({ path: join(OUTPUT, 'technician-site.png'), animations: 'disabled' });
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
    }

    await check('a field crew member changes their own password from the account menu on a phone, and only the new one signs in', async () => {
      const newPassword = 'kwame-has-a-new-password';
      await page.setViewportSize({ width: 360, height: 740 });
      try {
        await signIn(page, base, 'crew2@saltmarsh.example');
        await page.waitForURL(`${base}/fleet`);
        await page.getByTestId('user-menu').click();
        await page.getByTestId('change-password').click();
        await page.waitForURL(`${base}/account/password`);
        await page.getByLabel('Current password').fill(PASSWORD);
        await page.getByLabel('New password', { exact: true }).fill(newPassword);
        await page.getByLabel('New password again').fill(newPassword);
        await page.getByRole('button', { name: 'Change password' }).click();
        await page.getByTestId('password-changed').waitFor();
        await page.screenshot({ path: join(OUTPUT, 'change-password-phone.png'), animations: 'disabled' });
        await page.emulateMedia({ colorScheme: 'dark' });
        await page.screenshot({ path: join(OUTPUT, 'change-password-phone-dark.png'), animations: 'disabled' });
        await page.emulateMedia({ colorScheme: 'light' });
        await signOut(page, base);
        await signIn(page, base, 'crew2@saltmarsh.example');
        await page.getByTestId('sign-in-problem').waitFor();
        await page.getByLabel('Password', { exact: true }).fill(newPassword);
        await page.getByRole('button', { name: 'Sign in' }).click();
        await page.waitForURL(`${base}/fleet`);
        await signOut(page, base);
      } finally {
        await page.setViewportSize({ width: 1280, height: 800 });
      }
    });

    await check('an owner opening another owner’s site sees "not found"', async () => {
      await signIn(page, base, 'owner@quillmoor.example');
      await page.waitForURL(`${base}/sites`);
      const fenwickId = await siteIdByName(stack, 'Glasshouse Atrium');
      await page.goto(`${base}/sites/${fenwickId}`);
      await page.getByRole('heading', { name: 'Site not found' }).waitFor();
      await signOut(page, base);
    });

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
      await page.screenshot({ path: join(OUTPUT, 'admin-add-site.png') });
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
      await page.screenshot({ path: join(OUTPUT, 'admin-person-taken-email.png'), animations: 'disabled' });
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
      await page.screenshot({ path: join(OUTPUT, 'admin-device-secret.png'), animations: 'disabled' });
      const done = secretDialog.getByRole('button', { name: 'Done' });
      expectTrue(await done.isDisabled(), 'Done waits until the admin confirms the secret is stored');
      await secretDialog.getByText('I have stored the secret safely').click();
      await done.click();
      await secretDialog.waitFor({ state: 'detached' });
      await page.getByRole('table', { name: 'Tracker units' }).getByText(serial).waitFor();
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
      for (const text of await table.locator('tr.mat-mdc-row').allTextContents()) expectTrue(text.includes('Added a site'), `row is an "Added a site" entry: ${text}`);
      await page.screenshot({ path: join(OUTPUT, 'admin-audit-log.png'), animations: 'disabled' });
    });

    await check('the shell works on a 360 px wide phone screen', async () => {
      await page.setViewportSize({ width: 360, height: 740 });
      await page.goto(`${base}/sites`);
      await page.getByRole('button', { name: 'Open navigation' }).click();
      await page.getByTestId('main-nav').getByRole('link', { name: 'People' }).click();
      await page.getByRole('heading', { name: 'People' }).waitFor();
      await page.screenshot({ path: join(OUTPUT, 'admin-phone-people.png'), animations: 'disabled' });
      await page.setViewportSize({ width: 1280, height: 800 });
    });

    await check('dark colours follow the device, and the toggle overrides them', async () => {
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.goto(`${base}/sites`);
      await page.locator('ul.cards li.card').first().waitFor();
      const darkBackground = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      await page.screenshot({ path: join(OUTPUT, 'admin-dark.png'), animations: 'disabled' });
      await page.getByRole('button', { name: /^Colours: Follow device/ }).click();
      await page.getByRole('button', { name: /^Colours: Light/ }).waitFor();
      const lightBackground = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
      expectTrue(darkBackground !== lightBackground, `background changes (${darkBackground} vs ${lightBackground})`);
      await page.reload();
      await page.getByRole('button', { name: /^Colours: Light/ }).waitFor();
      // Back to following the device for whoever uses this profile next.
      await page.getByRole('button', { name: /^Colours: Light/ }).click();
      await page.getByRole('button', { name: /^Colours: Dark/ }).click();
      await page.getByRole('button', { name: /^Colours: Follow device/ }).waitFor();
      await page.emulateMedia({ colorScheme: 'light' });
      await signOut(page, base);
    });

    // ---- Live screens: fleet board, unit view, trace explorer, landscape view ----
    const unitSerial = 'QED-2401';
    const unitId = await unitIdBySerial(stack, unitSerial);
    const fake = await connectUnit(stack.broker.port, unitSerial);
    let seq = 1;
    const report = (over: Partial<Telemetry>) => publish(fake, unitSerial, 'telemetry', sample(seq++, Date.now(), over));

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
      await page.screenshot({ path: join(OUTPUT, 'fleet-board.png'), animations: 'disabled' });
    });

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
      for (const words of ['pinch', 'stored mechanical energy', 'DC voltage', 'wind', 'not a lockout', 'Local codes and licensed practice']) {
        expectTrue(caution.includes(words), `caution mentions "${words}"`);
      }
      expectTrue(await dialog.getByTestId('confirm').isDisabled(), 'confirm disabled until the sender states nobody is within reach');
      await dialog.getByTestId('people-clear').click();
      await dialog.locator('[data-testid="confirm"]:enabled').waitFor({ timeout: 2000 }).catch(() => undefined);
      expectTrue(await dialog.getByTestId('confirm').isEnabled(), 'confirm enabled after the check');
      await page.screenshot({ path: join(OUTPUT, 'unit-command-confirm.png'), animations: 'disabled' });
      await dialog.getByTestId('confirm').click();
      await page.getByTestId('command-history').getByText('stow').waitFor();
      await page.screenshot({ path: join(OUTPUT, 'unit-view.png'), fullPage: true, animations: 'disabled' });
    });

    await check('a unit on maintenance hold shows it and refuses motion in the panel', async () => {
      await report({ mode: 'held' });
      await page.getByTestId('hold-banner').waitFor({ timeout: 3000 });
      expectTrue(await page.getByTestId('cmd-scan').isDisabled(), 'scan disabled on hold');
      await page.getByText('The unit is on maintenance hold: motion is refused').first().waitFor();
      await page.screenshot({ path: join(OUTPUT, 'unit-view-on-hold.png'), animations: 'disabled' });
      await report({ mode: 'settled' });
      await signOut(page, base);
    });

    await check('a crew member puts their own hold on a unit with a note, sees it listed, and releases it after confirming nobody is within reach', async () => {
      await signIn(page, base, 'crew1@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      await page.goto(`${base}/units/${unitId}`);
      await page.getByTestId('holds-empty').waitFor();
      await page.getByTestId('cmd-hold').click();
      let dialog = await openedDialog(page);
      expectTrue(((await dialog.getByTestId('command-caution').textContent()) ?? '').includes('not a lockout'), 'hold caution says a hold is not a lockout');
      await dialog.getByTestId('command-text').fill('Replacing the tilt drive');
      await dialog.getByTestId('confirm').click();
      const mine = page.getByTestId('hold-panel').locator('li', { hasText: 'Ines Calder' });
      await mine.getByText('Replacing the tilt drive').waitFor({ timeout: 3000 });
      await page.getByTestId('hold-banner').filter({ hasText: 'by Ines Calder' }).waitFor();
      expectTrue(await page.getByTestId('cmd-hold').isDisabled(), 'a second hold of the same person is not offered');
      await page.setViewportSize({ width: 360, height: 740 });
      await page.getByTestId('hold-panel').scrollIntoViewIfNeeded();
      await page.screenshot({ path: join(OUTPUT, 'unit-view-hold-panel-phone.png'), animations: 'disabled' });
      await page.setViewportSize({ width: 1280, height: 800 });
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.getByTestId('hold-panel').screenshot({ path: join(OUTPUT, 'unit-view-hold-panel-dark.png'), animations: 'disabled' });
      await page.emulateMedia({ colorScheme: 'light' });

      await page.getByTestId('release-own').click();
      dialog = await openedDialog(page);
      const caution = (await dialog.getByTestId('command-caution').textContent()) ?? '';
      for (const words of ['move at once', 'not a lockout', 'lockout/tagout procedure', 'Local codes and licensed practice']) expectTrue(caution.includes(words), `release caution mentions "${words}"`);
      expectTrue(await dialog.getByTestId('confirm').isDisabled(), 'release disabled until the sender states nobody is within reach');
      await page.screenshot({ path: join(OUTPUT, 'unit-release-hold-confirm.png'), animations: 'disabled' });
      await dialog.getByTestId('people-clear').click();
      await dialog.locator('[data-testid="confirm"]:enabled').waitFor({ timeout: 2000 });
      await dialog.getByTestId('confirm').click();
      await page.getByTestId('holds-empty').waitFor({ timeout: 3000 });
      await page.getByTestId('hold-banner').waitFor({ state: 'detached', timeout: 3000 });
      await signOut(page, base);
    });

    // ---- Alarms: a trap alarm stored as the health service would, and a finished scan of the same unit ----
    const alarmUnit = await unitIdBySerial(stack, 'QHL-2401');
    const alarmSite = await siteIdByName(stack, 'Harbourside Library Roof');
    const knex = stack.db as unknown as (table: string) => { insert(row: object): Promise<number[]>; where(c: object): { first(...cols: string[]): Promise<Record<string, unknown> | undefined> } };
    const seen = Date.now() - 40 * 60_000;
    const [alarmId] = await knex('alarms').insert({
      unit_id: alarmUnit, site_id: alarmSite, kind: 'trap', severity: 'P2', state: 'active',
      message: 'Settled at tilt 52°, azimuth 250° on 410 W/m² while the brightest orientation (tilt 30°, azimuth 178°) gets 860 W/m²: losing 450 W/m² (52.3 %).',
      advice: 'Send a scan, then go to the brightest orientation it finds; raise the detector tilt from 6° to at least 14°.',
      evidence: JSON.stringify({ readings: { poaWm2: 410, tiltDeg: 52, azimuthDeg: 250 }, model: { globalMax: { tiltDeg: 30, azimuthDeg: 178, wm2: 860 }, modelledHereWm2: 415, localMaxima: [{}, {}], minSinglePeakDetectorTiltDeg: 14 }, lossWm2: 450, lossPct: 52.3, detectorTiltDeg: 6 }),
      first_seen_at: new Date(seen), raised_at: new Date(seen + 10 * 60_000), last_seen_at: new Date(Date.now() - 60_000),
    });
    const scanAt = Date.now() - 20 * 60_000;
    const samples: [number, number, number][] = [];
    for (let t = 0; t <= 80; t += 10) for (let a = 90; a <= 300; a += 15) {
      const d1 = ((t - 30) / 25) ** 2 + ((a - 180) / 40) ** 2;
      const d2 = ((t - 50) / 15) ** 2 + ((a - 255) / 25) ** 2;
      samples.push([t, a, Math.round(120 + 740 * Math.exp(-d1) + 300 * Math.exp(-d2))]);
    }
    await knex('unit_events').insert({ unit_id: alarmUnit, ts: new Date(scanAt), kind: 'scan-samples', body: JSON.stringify({ v: 1, ts: new Date(scanAt).toISOString(), kind: 'scan-samples', commandId: 'e2e-scan-1', samples }) });
    await knex('unit_events').insert({ unit_id: alarmUnit, ts: new Date(scanAt + 120_000), kind: 'scan-complete', body: JSON.stringify({ v: 1, ts: new Date(scanAt + 120_000).toISOString(), kind: 'scan-complete', commandId: 'e2e-scan-1' }) });

    await check('a technician sees the alarm on the fleet board and the alarms screen, and acknowledges it', async () => {
      await signIn(page, base, 'tech1@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      const badge = page.getByTestId('alarm-badge-QHL-2401');
      await badge.waitFor();
      expectTrue(((await badge.textContent()) ?? '').includes('P2 Stuck on a lesser peak'), 'fleet badge names severity and kind in words');
      await page.getByRole('button', { name: /With open alarms/ }).click();
      await page.locator('tr[data-unit]').nth(1).waitFor({ state: 'detached', timeout: 3000 }).catch(() => undefined);
      expectEqual(await page.locator('tr[data-unit]').count(), 1, 'the open-alarms filter leaves the one unit');
      await page.getByRole('link', { name: 'Alarms' }).first().click();
      await page.waitForURL(`${base}/alarms`);
      const card = page.getByTestId(`alarm-${alarmId}`);
      await card.waitFor();
      expectTrue(((await page.getByTestId(`alarm-sev-${alarmId}`).textContent()) ?? '').includes('P2 High'), 'severity shown by code and word');
      await card.locator('dt', { hasText: 'Modelled brightest' }).waitFor();
      await card.locator('dd', { hasText: '450 W/m² (52.3 %)' }).waitFor();
      expectTrue(((await page.getByTestId(`alarm-traces-${alarmId}`).getAttribute('href')) ?? '').includes(`/traces?units=${alarmUnit}`), 'links to the trace explorer at the alarm time');
      await page.screenshot({ path: join(OUTPUT, 'alarms.png'), fullPage: true, animations: 'disabled' });
      await page.getByTestId(`ack-${alarmId}`).click();
      await page.getByTestId(`alarm-status-${alarmId}`).filter({ hasText: 'Acknowledged by Mara Okonjo' }).waitFor({ timeout: 3000 });
      const row = await knex('alarms').where({ id: alarmId }).first('acknowledged_at', 'acknowledged_by');
      expectTrue(row?.['acknowledged_at'] != null && row?.['acknowledged_by'] != null, 'acknowledgement stored with who and when');
      await page.screenshot({ path: join(OUTPUT, 'alarms-acknowledged.png'), animations: 'disabled' });
    });

    await check('the unit view shows the trap finding and the scan result, and going to the brightest orientation asks for confirmation', async () => {
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
      await page.screenshot({ path: join(OUTPUT, 'unit-alarm.png'), fullPage: true, animations: 'disabled' });
      await signOut(page, base);
    });

    await check('owners see their own sites’ alarms read-only, and not other owners’', async () => {
      await signIn(page, base, 'owner@quillmoor.example');
      // Wait for the sign-in to land: navigating away at once can cancel it before the cookie is set.
      await page.waitForURL(`${base}/sites`);
      await page.goto(`${base}/alarms`);
      await page.getByTestId(`alarm-${alarmId}`).waitFor();
      expectEqual(await page.getByTestId(`ack-${alarmId}`).count(), 0, 'no acknowledge button for owners');
      await signOut(page, base);
      await signIn(page, base, 'owner@fenwicklane.example');
      // Wait for the sign-in to land: navigating away at once can cancel it before the cookie is set.
      await page.waitForURL(`${base}/sites`);
      await page.goto(`${base}/alarms`);
      await page.getByTestId('alarms-empty').waitFor();
      expectEqual(await page.getByTestId(`alarm-${alarmId}`).count(), 0, 'another owner does not see it');
      await page.setViewportSize({ width: 360, height: 740 });
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.screenshot({ path: join(OUTPUT, 'alarms-empty-phone-dark.png'), animations: 'disabled' });
      await page.setViewportSize({ width: 1280, height: 800 });
      await page.emulateMedia({ colorScheme: 'light' });
      await signOut(page, base);
    });

    const dayStart = Date.UTC(2026, 5, 20);
    const roofUnit = alarmUnit;
    await insertDayOfTelemetry(stack.db, roofUnit, dayStart);
    await check('an engineer opens a day in the trace explorer and zooms in, and finer data loads', async () => {
      await signIn(page, base, 'engineer@saltmarsh.example');
      await page.waitForURL(`${base}/fleet`);
      const from = new Date(dayStart).toISOString();
      const to = new Date(dayStart + 86_400_000).toISOString();
      const first = page.waitForResponse((r) => r.url().includes(`/api/units/${roofUnit}/traces?`) && r.status() === 200);
      await page.goto(`${base}/traces?units=${roofUnit}&from=${from}&to=${to}`);
      const body = (await (await first).json()) as { rows: number; bucketMs: number; events: unknown[] };
      expectEqual(body.rows, 17_280, 'reports in the day');
      expectTrue(body.events.length === 2, 'events overlaid');
      const chart = page.getByTestId('trace-chart');
      await chart.waitFor();
      await page.waitForTimeout(500);
      const before = (await page.getByTestId('visible-range').textContent()) ?? '';
      const finer = page.waitForResponse((r) => r.url().includes(`/api/units/${roofUnit}/traces?`) && !r.url().includes(encodeURIComponent(from)) && r.status() === 200, { timeout: 10_000 });
      const box = (await chart.boundingBox())!;
      await page.mouse.move(box.x + box.width * 0.45, box.y + box.height * 0.3);
      for (let i = 0; i < 8; i++) {
        await page.mouse.wheel(0, -300);
        await page.waitForTimeout(60);
      }
      const detail = (await (await finer).json()) as { bucketMs: number };
      expectTrue(detail.bucketMs < body.bucketMs, `finer buckets after zoom (${detail.bucketMs} ms < ${body.bucketMs} ms)`);
      await page.waitForTimeout(500);
      const after = (await page.getByTestId('visible-range').textContent()) ?? '';
      expectTrue(after !== before, `visible range changed (${after})`);
      const csv = await page.locator('[data-testid="csv-QHL-2401"]').getAttribute('href');
      expectTrue(Boolean(csv?.includes('/traces.csv?')), 'CSV link for the visible range');
      await page.screenshot({ path: join(OUTPUT, 'trace-explorer.png'), fullPage: true, animations: 'disabled' });
    });

    await check('the landscape view shows two peaks with basins for the library roof on a summer morning', async () => {
      const roof = await siteIdByName(stack, 'Harbourside Library Roof');
      await page.goto(`${base}/landscape?site=${roof}&date=2026-06-21&time=09:00`);
      await page.getByTestId('landscape-summary').filter({ hasText: '2 peaks' }).waitFor({ timeout: 15_000 });
      const rows = page.getByTestId('maxima-table').locator('tbody tr');
      expectEqual(await rows.count(), 2, 'peaks listed');
      expectTrue(((await rows.nth(0).textContent()) ?? '').includes('Modelled best'), 'global peak first');
      await page.getByTestId('day-recommendation').waitFor({ timeout: 15_000 });
      await page.waitForTimeout(800);
      await page.screenshot({ path: join(OUTPUT, 'landscape-view.png'), fullPage: true, animations: 'disabled' });
    });

    await check('a horizon CSV with bad rows is refused line by line and nothing changes', async () => {
      await page.getByTestId('horizon-csv').setInputFiles({
        name: 'horizon.csv', mimeType: 'text/csv', buffer: Buffer.from('azimuth,elevation\r\n0,5\r\n400,3\r\n90,x\r\n'),
      });
      const problems = page.getByTestId('csv-problems');
      await problems.waitFor();
      const text = (await problems.textContent()) ?? '';
      expectTrue(text.includes('Line 3') && text.includes('Line 4'), `bad lines named (${text.slice(0, 120)})`);
      expectTrue(await page.getByTestId('survey-save').isDisabled(), 'nothing to save');
      await page.getByTestId('survey-problems').waitFor({ state: 'detached' }).catch(() => undefined);
      await page.getByTestId('csv-problems').scrollIntoViewIfNeeded();
      await page.screenshot({ path: join(OUTPUT, 'survey-editor-bad-csv.png'), animations: 'disabled' });
    });

    await check('the fleet board and unit view work on a 360 px phone screen and in dark colours', async () => {
      await page.setViewportSize({ width: 360, height: 740 });
      await page.goto(`${base}/fleet`);
      await page.getByTestId(`state-${unitSerial}`).waitFor();
      await page.screenshot({ path: join(OUTPUT, 'fleet-board-phone.png'), animations: 'disabled' });
      await page.setViewportSize({ width: 1280, height: 800 });
      await page.emulateMedia({ colorScheme: 'dark' });
      await page.goto(`${base}/units/${unitId}`);
      await page.getByRole('heading', { name: unitSerial }).waitFor();
      await page.waitForTimeout(800);
      await page.screenshot({ path: join(OUTPUT, 'unit-view-dark.png'), animations: 'disabled' });
      await page.emulateMedia({ colorScheme: 'light' });
      await signOut(page, base);
    });
    await fake.endAsync().catch(() => undefined);

    await check('no request left the machine', async () => {
      expectEqual(offMachine, [], 'requests to other hosts');
    });

    await check('the dashboard ran under a content security policy that allows only its own scripts, with nothing refused', async () => {
      const response = await page.goto(`${base}/sign-in`);
      const csp = (await response?.headerValue('content-security-policy')) ?? '';
      expectTrue(/script-src 'self'(;|$)/.test(csp), `script-src 'self' only (got "${csp}")`);
      await page.getByRole('heading', { name: 'Sign in to Brightward' }).waitFor();
      const font = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
      expectTrue(font.includes('Inter'), `the stylesheet applied (body font ${font})`);
      expectEqual(cspViolations, [], 'content security policy refusals');
    });
  } finally {
    await context?.close().catch(() => undefined);
    rmSync(profile, { recursive: true, force: true });
    await stack.stop();
  }

  console.log(`${passed} passed, ${failed} failed`);
  return failed === 0 ? 0 : 1;
}

/**
 * The open dialog once its opening animation is over and it has moved focus inside: typing before that can land in
 * whichever field the dialog focuses a moment later.
 */
async function openedDialog(page: Page) {
  const dialog = page.getByRole('dialog');
  await dialog.waitFor();
  await page.waitForFunction(() => !!document.activeElement?.closest('mat-dialog-container') && !document.querySelector('.mdc-dialog--opening'));
  return dialog;
}

async function signIn(page: Page, base: string, email: string): Promise<void> {
  await page.goto(`${base}/sign-in`);
  await page.getByLabel('Email address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

async function signOut(page: Page, base: string): Promise<void> {
  await page.getByTestId('user-menu').click();
  await page.getByTestId('sign-out').click();
  await page.waitForURL(`${base}/sign-in`);
}

async function unitIdBySerial(stack: { db: unknown }, serial: string): Promise<number> {
  const db = stack.db as (table: string) => { where(c: object): { first(col: string): Promise<{ id: number } | undefined> } };
  const row = await db('units').where({ serial }).first('id');
  if (!row) throw new CheckFailed(`no unit ${serial} in the test database`);
  return row.id;
}

async function siteIdByName(stack: { db: { (table: string): unknown } }, name: string): Promise<number> {
  const db = stack.db as unknown as (table: string) => { where(c: object): { first(col: string): Promise<{ id: number } | undefined> } };
  const row = await db('sites').where({ name }).first('id');
  if (!row) throw new CheckFailed(`no site named ${name} in the test database`);
  return row.id;
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(error);
    console.log('0 passed, 1 failed');
    process.exit(1);
  },
);
