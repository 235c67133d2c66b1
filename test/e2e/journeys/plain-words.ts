import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { detectorWords } from '../../../shared/contracts/plain-words';
import { rawWordsIn } from '../../helpers/raw-words';
import {
  DEMO_USERS,
  expectEqual,
  expectTrue,
  signIn,
  signOut,
  siteIdByName,
  type Journey,
  type RoleName,
  type TestStack,
} from '../harness';
import { insertTrapAlarm } from '../demo-data';

/** One person of each role, and the screens each may open (their navigation, a site, a unit, their account). */
const PEOPLE: { email: string; role: RoleName }[] = [
  { email: 'admin@saltmarsh.example', role: 'admin' },
  { email: 'engineer@saltmarsh.example', role: 'engineer' },
  { email: 'tech1@saltmarsh.example', role: 'technician' },
  { email: 'crew1@saltmarsh.example', role: 'crew' },
  { email: 'owner@quillmoor.example', role: 'owner' },
];

interface Screen {
  path: string;
  /** Waits until the screen shows what it loads. */
  ready: (page: Page) => Promise<void>;
  roles: readonly RoleName[];
}

const STAFF: RoleName[] = ['admin', 'engineer', 'technician', 'crew'];
const heading = (name: string | RegExp) => (page: Page) => page.getByRole('heading', { name, level: 1 }).first().waitFor();

/**
 * Stored things that carry machine names (an alarm whose evidence names a detector by its key, commands of every
 * kind with settings, audit entries of them), so that every screen has something to word.
 */
async function insertWordyHistory(
  stack: TestStack,
  unitId: number,
  siteId: number,
): Promise<{ alarmIds: number[]; commandIds: string[]; ticketId: number }> {
  const admin = (await stack.db('users').where({ email: 'admin@saltmarsh.example' }).first('id')) as { id: number };
  const now = Date.now();
  const trap = await insertTrapAlarm(stack.db, unitId, siteId);
  const [drift] = await stack.db('alarms').insert({
    unit_id: unitId,
    site_id: siteId,
    kind: 'drift',
    severity: 'P3',
    state: 'active',
    message: `The ${detectorWords('tiltPlus')} reads 61 % of what it should where the unit points (gain drift −39 %).`,
    advice: `Clean and inspect the ${detectorWords('tiltPlus')} and its connector.`,
    evidence: JSON.stringify({
      readings: { poaWm2: 512, tiltDeg: 31, azimuthDeg: 171, mode: 'seeking' },
      detector: 'tiltPlus',
      finding: 'drifting',
    }),
    first_seen_at: new Date(now - 30 * 60_000),
    raised_at: new Date(now - 25 * 60_000),
    last_seen_at: new Date(now - 60_000),
  });
  const commands = [
    { kind: 'configure', params: { config: { detectorTiltDeg: 20, deadbandWm2: 4 } }, status: 'completed' },
    { kind: 'release-hold', params: null, status: 'timed-out', reason: 'no answer from the unit' },
    { kind: 'goto', params: { tiltDeg: 30, azimuthDeg: 178 }, status: 'acknowledged' },
    { kind: 'release-stow', params: null, status: 'rejected', reason: 'rejected by the unit' },
  ];
  const commandIds: string[] = [];
  for (const [i, c] of commands.entries()) {
    const id = `e2e-words-${process.pid}-${i}`;
    commandIds.push(id);
    const at = new Date(now - (10 - i) * 60_000);
    await stack.db('commands').insert({
      id,
      unit_id: unitId,
      kind: c.kind,
      params: c.params === null ? null : JSON.stringify(c.params),
      status: c.status,
      reason: c.reason ?? null,
      issued_by: admin.id,
      issued_at: at,
      sent_at: at,
      finished_at: c.status === 'acknowledged' ? null : at,
    });
    await stack.db('audit_log').insert({
      user_id: admin.id,
      action: 'command',
      target: `unit:${unitId}`,
      detail: JSON.stringify({ commandId: id, kind: c.kind, ...(c.params ?? {}) }),
    });
  }
  await stack.db('audit_log').insert({
    user_id: admin.id,
    action: 'alarm-acknowledge',
    target: `alarm:${drift}`,
    detail: JSON.stringify({ severity: 'P3', kind: 'drift' }),
  });
  // A ticket of the drift, waiting for parts, with its history: states, reasons and categories have machine names too.
  const crew = (await stack.db('users').where({ email: 'crew1@saltmarsh.example' }).first('id')) as { id: number };
  const opened = new Date(now - 3 * 3600_000);
  const due = (h: number) => new Date(opened.getTime() + h * 3600_000);
  const [ticketId] = await stack.db('tickets').insert({
    site_id: siteId,
    unit_id: unitId,
    kind: 'drift',
    severity: 'P3',
    title: 'Detector drift on the tilt pair',
    state: 'waiting',
    version: 3,
    assignee_id: crew.id,
    fault_key: `unit:${unitId}:drift`,
    opened_at: opened,
    acknowledge_due_at: due(4),
    on_site_due_at: due(120),
    fix_due_at: due(240),
    acknowledged_at: due(1),
    waiting_reason: 'parts',
    availability_category: 'partial-performance',
    parts: JSON.stringify([{ description: 'detector pair', quantity: 1 }]),
  });
  await stack.db('ticket_transitions').insert([
    { ticket_id: ticketId, from_state: null, to_state: 'new', at: opened, by_user: null, reason: `Opened for alarm ${drift}` },
    { ticket_id: ticketId, from_state: 'new', to_state: 'dispatched', at: opened, by_user: admin.id, assignee_id: crew.id },
    { ticket_id: ticketId, from_state: 'dispatched', to_state: 'acknowledged', at: due(1), by_user: crew.id },
    { ticket_id: ticketId, from_state: 'acknowledged', to_state: 'waiting', at: due(2), by_user: crew.id, reason: 'parts' },
  ]);
  await stack.db('ticket_alarms').insert({ ticket_id: ticketId, alarm_id: drift, evidence: '{}', linked_at: opened });
  return { alarmIds: [trap, drift as number], commandIds, ticketId: ticketId as number };
}

/**
 * Every screen, as every role, in words: no alarm kind, unit mode, command name, wire field or survey path shows by its
 * machine name (the list comes from the contracts: test/helpers/raw-words.ts). Owners open the units of their own
 * sites read-only, with no command, setting or survey controls, and another owner's unit is "not found".
 */
export const plainWordsJourney: Journey = {
  name: 'plain words',
  async run({ page, base, stack, check, output }) {
    const siteId = await siteIdByName(stack, 'Harbourside Library Roof');
    const units = (await stack.db('units').where({ site_id: siteId }).orderBy('id').pluck('id')) as number[];
    const unitId = units[2]!;
    const otherUnit = (await stack
      .db('units')
      .join('sites', 'sites.id', 'units.site_id')
      .where('sites.name', 'Glasshouse Atrium')
      .first('units.id')) as { id: number };
    const inserted = await insertWordyHistory(stack, unitId, siteId);

    const screens: Screen[] = [
      { path: '/fleet', ready: (p) => p.locator('tr[data-unit]').first().waitFor(), roles: STAFF },
      { path: '/alarms', ready: (p) => p.getByTestId(`alarm-${inserted.alarmIds[1]}`).waitFor(), roles: [...STAFF, 'owner'] },
      { path: '/sites', ready: (p) => p.locator('ul.cards li.card').first().waitFor(), roles: [...STAFF, 'owner'] },
      { path: '/tickets', ready: (p) => p.getByTestId(`ticket-${inserted.ticketId}`).waitFor(), roles: [...STAFF, 'owner'] },
      { path: '/my-work', ready: (p) => p.getByTestId(`ticket-${inserted.ticketId}`).waitFor(), roles: ['crew'] },
      { path: `/tickets/${inserted.ticketId}`, ready: (p) => p.getByTestId('ticket-state').waitFor(), roles: [...STAFF, 'owner'] },
      {
        path: `/sites/${siteId}`,
        ready: (p) => p.getByRole('table', { name: 'Tracker units of this site' }).locator('tr.mat-mdc-row').first().waitFor(),
        roles: [...STAFF, 'owner'],
      },
      {
        path: `/units/${unitId}`,
        ready: async (p) => {
          await p.getByTestId(`alarm-${inserted.alarmIds[1]}`).waitFor();
          if (!(await p.getByTestId('read-only-note').count())) await p.getByTestId('command-history').locator('tbody tr').nth(3).waitFor();
        },
        roles: [...STAFF, 'owner'],
      },
      { path: `/traces?units=${unitId}`, ready: heading('Trace explorer'), roles: ['admin', 'engineer', 'technician'] },
      {
        path: `/landscape?site=${siteId}`,
        ready: (p) => p.getByTestId('landscape-summary').waitFor({ timeout: 15_000 }),
        roles: ['admin', 'engineer'],
      },
      {
        path: `/health-settings?site=${siteId}`,
        ready: (p) => p.locator('[data-testid="history-empty"], [data-testid="history-entry"]').first().waitFor(),
        roles: ['admin', 'engineer', 'technician'],
      },
      {
        path: `/replay?site=${siteId}`,
        ready: (p) => p.getByTestId('replay-not-run').waitFor(),
        roles: ['admin', 'engineer', 'technician'],
      },
      { path: '/portfolio', ready: heading('Your portfolio'), roles: ['owner'] },
      { path: `/sites/${siteId}/statements`, ready: heading(/^Monthly statement · /), roles: [...STAFF, 'owner'] },
      { path: '/admin/people', ready: (p) => p.locator('tr.mat-mdc-row').first().waitFor(), roles: ['admin'] },
      { path: '/admin/owners', ready: (p) => p.locator('tr.mat-mdc-row').first().waitFor(), roles: ['admin'] },
      { path: '/admin/sites', ready: (p) => p.locator('tr.mat-mdc-row').first().waitFor(), roles: ['admin'] },
      { path: '/admin/units', ready: (p) => p.locator('tr.mat-mdc-row').first().waitFor(), roles: ['admin'] },
      { path: '/admin/audit', ready: (p) => p.locator('tr.mat-mdc-row').first().waitFor(), roles: ['admin'] },
      { path: '/admin/outbox', ready: heading('Outbox'), roles: ['admin'] },
      { path: '/notifications', ready: (p) => p.getByTestId('settings-form').waitFor(), roles: [...STAFF, 'owner'] },
      { path: '/account/password', ready: heading(/password/i), roles: [...STAFF, 'owner'] },
    ];

    try {
      for (const person of PEOPLE) {
        await check(`${person.role}: every screen they may open says things in words`, async () => {
          await signIn(page, base, person.email);
          await page.waitForURL(new RegExp(`${base}/(fleet|portfolio|my-work)$`));
          const found: string[] = [];
          for (const screen of screens.filter((s) => s.roles.includes(person.role))) {
            await page.goto(`${base}${screen.path}`);
            await screen.ready(page);
            await page.waitForLoadState('networkidle').catch(() => undefined);
            const text = await page.evaluate(() => document.body.innerText);
            for (const w of rawWordsIn(text)) found.push(`${screen.path}: "${w.word}" (${w.what}) in "…${w.context}…"`);
          }
          expectEqual(found, [], 'machine names on the screens');
          await signOut(page, base);
        });
        await page.context().clearCookies();
      }

      await check('the survey form names a bad field as the form does, counted from 1', async () => {
        await signIn(page, base, 'engineer@saltmarsh.example');
        await page.waitForURL(`${base}/fleet`);
        await page.goto(`${base}/landscape?site=${siteId}`);
        const facade = page.locator('fieldset.reflector').first();
        await facade.waitFor({ timeout: 15_000 });
        await facade.getByLabel('Reflectance (0–1)').fill('2');
        const problems = ((await page.getByTestId('survey-problems').textContent()) ?? '').trim();
        expectTrue(
          problems.includes('Facade 1, reflectance: Reflectance must be from 0 to 1.'),
          `names "Facade 1, reflectance" (got "${problems}")`,
        );
        expectEqual(rawWordsIn(problems), [], 'machine names in the survey problems');
        await signOut(page, base);
      });
      await page.context().clearCookies();

      await check('an owner opens a unit of their own site read-only: live values, the last hour and its alarms, no controls', async () => {
        const owner = DEMO_USERS.find((u) => u.email === 'owner@quillmoor.example')!;
        await signIn(page, base, owner.email);
        await page.waitForURL(`${base}/portfolio`);
        await page.goto(`${base}/alarms`);
        const card = page.getByTestId(`alarm-${inserted.alarmIds[1]}`);
        await card.getByRole('link', { name: 'Open unit' }).click();
        await page.waitForURL(`${base}/units/${unitId}`);
        await page.getByTestId('read-only-note').waitFor();
        await page.getByTestId('live-power').waitFor();
        await page.getByRole('heading', { name: 'Last hour' }).waitFor();
        await page.getByTestId(`alarm-${inserted.alarmIds[0]}`).waitFor();
        expectEqual(await page.locator('[data-testid^="cmd-"]').count(), 0, 'command buttons');
        expectEqual(await page.getByTestId('command-history').count(), 0, 'command history');
        expectEqual(
          await page.getByRole('button', { name: /acknowledge|send|scan|stow|hold|settings/i }).count(),
          0,
          'buttons that act on the unit',
        );
        expectEqual(await page.getByRole('heading', { name: 'No access to this page' }).count(), 0, 'no-access page');
        await page.screenshot({ path: join(output, 'owner-unit.png'), fullPage: true, animations: 'disabled' });
        await page.setViewportSize({ width: 360, height: 740 });
        await page.emulateMedia({ colorScheme: 'dark' });
        await page.screenshot({ path: join(output, 'owner-unit-phone-dark.png'), fullPage: true, animations: 'disabled' });
        await page.setViewportSize({ width: 1280, height: 800 });
        await page.emulateMedia({ colorScheme: 'light' });

        await page.goto(`${base}/units/${otherUnit.id}`);
        await page.getByRole('heading', { name: 'Unit not found' }).waitFor();
        await signOut(page, base);
      });
      await page.context().clearCookies();

      await check('severities differ in icon, colour and outline, in light and dark, and say their level in words', async () => {
        await signIn(page, base, 'tech1@saltmarsh.example');
        await page.waitForURL(`${base}/fleet`);
        await page.goto(`${base}/alarms`);
        await page.getByTestId('count-P1').waitFor();
        for (const scheme of ['light', 'dark'] as const) {
          await page.emulateMedia({ colorScheme: scheme });
          const looks = await page.evaluate(() =>
            ['sev-p1', 'sev-p2', 'sev-p3', 'sev-p4'].map((cls) => {
              const el = document.createElement('span');
              el.className = `sev ${cls}`;
              document.body.appendChild(el);
              const css = getComputedStyle(el);
              const look = {
                colour: `${css.backgroundColor}|${css.color}`,
                outline: `${css.borderTopStyle} ${css.borderLeftWidth} ${css.borderTopWidth} ${css.borderTopLeftRadius}`,
              };
              el.remove();
              return look;
            }),
          );
          expectEqual(new Set(looks.map((l) => l.colour)).size, 4, `${scheme}: four colours (${looks.map((l) => l.colour).join(', ')})`);
          expectEqual(new Set(looks.map((l) => l.outline)).size, 4, `${scheme}: four outlines (${looks.map((l) => l.outline).join(', ')})`);
          // A close-up of the four badges (the count per severity), enlarged so the shapes can be told apart by eye.
          const summary = page.locator('ul.summary');
          await summary.evaluate((el) => ((el as HTMLElement).style.zoom = '3'));
          await summary.screenshot({ path: join(output, `severities-${scheme}.png`), animations: 'disabled' });
          await summary.evaluate((el) => ((el as HTMLElement).style.zoom = ''));
        }
        const badges = (await page.locator('.sev').allTextContents()).map((t) => t.trim());
        expectTrue(
          badges.some((t) => t === 'release_alertP1 Urgent') || badges.some((t) => t.includes('P2 High')),
          `badges say their level (${badges.join(', ')})`,
        );
        await page.emulateMedia({ colorScheme: 'dark' });
        await page.setViewportSize({ width: 360, height: 740 });
        await page.screenshot({ path: join(output, 'alarms-phone-dark.png'), fullPage: true, animations: 'disabled' });
        await page.setViewportSize({ width: 1280, height: 800 });
        await page.emulateMedia({ colorScheme: 'light' });
        await signOut(page, base);
      });
    } finally {
      await stack.db('ticket_transitions').where({ ticket_id: inserted.ticketId }).delete();
      await stack.db('ticket_alarms').where({ ticket_id: inserted.ticketId }).delete();
      await stack.db('tickets').where({ id: inserted.ticketId }).delete();
      await stack.db('alarms').whereIn('id', inserted.alarmIds).delete();
      await stack.db('commands').whereIn('id', inserted.commandIds).delete();
    }
  },
};
