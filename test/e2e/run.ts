/**
 * End-to-end checks of the dashboard in headless Chromium against the real server on a fresh, seeded test database.
 * Run by `npm test` (which starts the test MariaDB and sets BW_DB_*), after `npm run build`. Starts the server (free
 * ports) and the browser once, then runs each user journey in `journeys/`; every journey starts signed out on a
 * 1280 × 800 light page and creates or looks up what it needs, so any one runs alone:
 * `npm run test:e2e -- alarms traces` runs only the journeys named, in that order. Screenshots go to test/.output/e2e/.
 * Prints each journey's result, then "N passed, M failed".
 */
import { existsSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext } from 'playwright-core';
import { startTestStack } from '../helpers/test-stack';
import type { E2e, Journey } from './harness';
import { accountJourney } from './journeys/account';
import { adminJourney } from './journeys/admin';
import { alarmsJourney } from './journeys/alarms';
import { controlsJourney } from './journeys/controls';
import { auditJourney } from './journeys/audit';
import { fleetBoardJourney } from './journeys/fleet-board';
import { landscapeJourney } from './journeys/landscape';
import { ownerIsolationJourney } from './journeys/owner-isolation';
import { pagePolicyChecks, type RunRecord } from './journeys/page-policy';
import { plainWordsJourney } from './journeys/plain-words';
import { rolesJourney } from './journeys/roles';
import { shellJourney } from './journeys/shell';
import { signInJourney } from './journeys/sign-in';
import { tracesJourney } from './journeys/traces';
import { unitCommandsJourney } from './journeys/unit-commands';
import { ticketsJourney } from './journeys/tickets';
import { notificationsJourney } from './journeys/notifications';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const OUTPUT = join(ROOT, 'test/.output/e2e');
const CHROMIUM = process.env['BW_CHROMIUM'] ?? '/usr/bin/chromium';

const JOURNEYS: readonly Journey[] = [
  signInJourney,
  rolesJourney,
  accountJourney,
  ownerIsolationJourney,
  adminJourney,
  auditJourney,
  shellJourney,
  fleetBoardJourney,
  unitCommandsJourney,
  alarmsJourney,
  tracesJourney,
  landscapeJourney,
  controlsJourney,
  ticketsJourney,
  notificationsJourney,
  plainWordsJourney,
];

async function main(only: readonly string[]): Promise<number> {
  const index = join(ROOT, 'dist/web/browser/index.html');
  if (!existsSync(index)) {
    console.error(`No built dashboard at ${index}. Run "npm run build" first.`);
    return 1;
  }
  if (!existsSync(CHROMIUM)) {
    console.error(`No Chromium at ${CHROMIUM}. Install Debian's "chromium" package (apt-get install chromium) or set BW_CHROMIUM.`);
    return 1;
  }
  const unknown = only.filter((name) => !JOURNEYS.some((j) => j.name === name));
  if (unknown.length) {
    console.error(
      `No journey named ${unknown.map((n) => `"${n}"`).join(', ')}. Journeys: ${JOURNEYS.map((j) => `"${j.name}"`).join(', ')}.`,
    );
    return 1;
  }
  mkdirSync(OUTPUT, { recursive: true });

  const stack = await startTestStack({ seed: true });
  const base = stack.url;
  const profile = mkdtempSync(join(tmpdir(), 'bw-e2e-chromium-'));
  let context: BrowserContext | undefined;
  let passed = 0;
  let failed = 0;
  const record: RunRecord = { offMachine: [], cspViolations: [] };

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
      if (!url.startsWith(origin) && !url.startsWith('data:') && !url.startsWith('blob:') && url !== 'about:blank')
        record.offMachine.push(url);
    });
    // The built dashboard must run under the server's content security policy: any refusal shows as a console message.
    context.on('console', (message) => {
      if (/Content Security Policy/i.test(message.text())) record.cspViolations.push(message.text());
    });
    const page = context.pages()[0] ?? (await context.newPage());

    let journeyName = '';
    let journeyPassed = 0;
    let journeyFailed = 0;
    const e2e: E2e = {
      page,
      base,
      stack,
      output: OUTPUT,
      async check(name, body) {
        const started = Date.now();
        try {
          await body();
          passed++;
          journeyPassed++;
          console.log(`  ok    ${name} (${Date.now() - started} ms)`);
        } catch (error) {
          failed++;
          journeyFailed++;
          const shot = join(OUTPUT, `failed-${journeyName.replace(/\W+/g, '-')}-${journeyPassed + journeyFailed}.png`);
          await page.screenshot({ path: shot, fullPage: true }).catch(() => undefined);
          console.log(
            `  FAIL  ${name}\n        ${error instanceof Error ? error.message.split('\n')[0] : String(error)}\n        screenshot: ${shot}`,
          );
        }
      },
    };

    const results: string[] = [];
    const runJourney = async (name: string, body: () => Promise<void>) => {
      journeyName = name;
      journeyPassed = 0;
      journeyFailed = 0;
      // Each journey starts signed out on a desktop-sized page in light colours, whatever the one before left.
      await context!.clearCookies();
      await page.setViewportSize({ width: 1280, height: 800 });
      await page.emulateMedia({ colorScheme: 'light' });
      await page.goto('about:blank');
      console.log(`journey: ${name}`);
      const started = Date.now();
      try {
        await body();
      } catch (error) {
        // A failure outside any check (setting up what the journey needs) fails the journey as one more check.
        failed++;
        journeyFailed++;
        console.log(`  FAIL  ${name} could not run\n        ${error instanceof Error ? error.message.split('\n')[0] : String(error)}`);
      }
      results.push(
        `  ${journeyFailed ? 'FAIL' : 'ok  '}  ${name}: ${journeyPassed} passed, ${journeyFailed} failed (${Math.round((Date.now() - started) / 1000)} s)`,
      );
    };

    // Journeys named on the command line run in the order given (any order works: none relies on another).
    const chosen = only.length ? only.map((name) => JOURNEYS.find((j) => j.name === name)!) : JOURNEYS;
    for (const journey of chosen) await runJourney(journey.name, () => journey.run(e2e));
    await runJourney('page policy', () => pagePolicyChecks(e2e, record));
    console.log(`\njourneys:\n${results.join('\n')}`);
  } finally {
    await context?.close().catch(() => undefined);
    rmSync(profile, { recursive: true, force: true });
    await stack.stop();
  }

  console.log(`${passed} passed, ${failed} failed`);
  return failed === 0 ? 0 : 1;
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(error);
    console.log('0 passed, 1 failed');
    process.exit(1);
  },
);
