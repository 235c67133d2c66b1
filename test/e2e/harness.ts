/**
 * What every browser journey shares: the page and server it runs against, `check` (one named check, counted and
 * screenshotted on failure), the demo people, and the steps most journeys take (sign in, sign out, wait for a dialog).
 */
import type { Page } from 'playwright-core';
import type { startTestStack } from '../helpers/test-stack';

export type TestStack = Awaited<ReturnType<typeof startTestStack>>;

/** One run of a journey: the browser page (signed out, 1280 × 800, light colours at the start), the server and `check`. */
export interface E2e {
  page: Page;
  /** The server's address, e.g. http://127.0.0.1:40123. */
  base: string;
  stack: TestStack;
  /** Where screenshots go. */
  output: string;
  /** Runs one named check: a thrown error fails it (with a screenshot) and the journey goes on with the next. */
  check(name: string, body: () => Promise<void>): Promise<void>;
}

/** One user journey: creates or looks up what it needs, so journeys run in any order and alone. */
export interface Journey {
  name: string;
  run(e: E2e): Promise<void>;
}

export const PASSWORD = 'brightward-demo';

export type RoleName = 'admin' | 'engineer' | 'technician' | 'crew' | 'owner';

export interface DemoUser {
  email: string;
  name: string;
  role: RoleName;
  roleLabel: string;
  /** Exactly the sites this user must see; null = every site of the demo world. */
  sites: string[] | null;
}

export const ALL_SITES = [
  'Cedar Flats Pump Yard',
  'Eastfield Depot Yard',
  'Fenwick Lane School Courtyard',
  'Glasshouse Atrium',
  'Harbourside Library Roof',
  'Kerio Ridge Clinic Roof',
  'Kolova Harbour Market Roof',
  'Mesa Seca Reservoir',
  'Punta Salinas Pumping Station',
  'Redgum Flat Depot',
];
export const DEMO_USERS: DemoUser[] = [
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
  {
    email: 'owner@tindara.example',
    name: 'Camila Arroyo',
    role: 'owner',
    roleLabel: 'Owner',
    sites: ['Mesa Seca Reservoir', 'Punta Salinas Pumping Station'],
  },
  { email: 'owner@nyasoro.example', name: 'Wanjiru Otieno', role: 'owner', roleLabel: 'Owner', sites: ['Kerio Ridge Clinic Roof'] },
  {
    email: 'owner@wattlebank.example',
    name: 'Isla Brennan',
    role: 'owner',
    roleLabel: 'Owner',
    sites: ['Kolova Harbour Market Roof', 'Redgum Flat Depot'],
  },
  { email: 'owner@cedarflats.example', name: 'Dale Marchetti', role: 'owner', roleLabel: 'Owner', sites: ['Cedar Flats Pump Yard'] },
];

export class CheckFailed extends Error {}

export function expectEqual<T>(actual: T, expected: T, what: string): void {
  const a = JSON.stringify(actual);
  const e = JSON.stringify(expected);
  if (a !== e) throw new CheckFailed(`${what}: expected ${e}, got ${a}`);
}

export function expectTrue(condition: boolean, what: string): void {
  if (!condition) throw new CheckFailed(what);
}

/**
 * The open dialog once its opening animation is over and it has moved focus inside: typing before that can land in
 * whichever field the dialog focuses a moment later.
 */
export async function openedDialog(page: Page) {
  const dialog = page.getByRole('dialog');
  await dialog.waitFor();
  await page.waitForFunction(
    () => !!document.activeElement?.closest('mat-dialog-container') && !document.querySelector('.mdc-dialog--opening'),
  );
  return dialog;
}

export async function signIn(page: Page, base: string, email: string, password = PASSWORD): Promise<void> {
  await page.goto(`${base}/sign-in`);
  await page.getByLabel('Email address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

export async function signOut(page: Page, base: string): Promise<void> {
  await page.getByTestId('user-menu').click();
  await page.getByTestId('sign-out').click();
  await page.waitForURL(`${base}/sign-in`);
}

export async function unitIdBySerial(stack: TestStack, serial: string): Promise<number> {
  const row = (await stack.db('units').where({ serial }).first('id')) as { id: number } | undefined;
  if (!row) throw new CheckFailed(`no unit ${serial} in the test database`);
  return row.id;
}

export async function siteIdByName(stack: TestStack, name: string): Promise<number> {
  const row = (await stack.db('sites').where({ name }).first('id')) as { id: number } | undefined;
  if (!row) throw new CheckFailed(`no site named ${name} in the test database`);
  return row.id;
}

/** A REST call as the person signed in on the page (the page's session cookie), failing the check on any error status. */
export async function apiAsPage<T>(page: Page, base: string, method: 'GET' | 'POST', path: string, data?: object): Promise<T> {
  const response = await page.request.fetch(`${base}${path}`, { method, ...(data ? { data } : {}) });
  if (!response.ok()) throw new CheckFailed(`${method} ${path}: ${response.status()} ${await response.text()}`);
  return (await response.json()) as T;
}
