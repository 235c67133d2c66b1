/**
 * `demo-history.ts fill | background [--now <ISO>]`: the demo's generated past (server/services/demo-history.ts).
 *   fill         before the server starts: the rollup-level past, the newest day at full rate and their alarms (first
 *                seeding), or the gap since the last stored report (restart)
 *   background   while the product runs: the statements' model columns of the full-rate buckets the fill left empty,
 *                then the remaining full-rate days, newest first, with progress in the database
 * Both then give the past alarms the tickets the rules would have opened, worked and closed (seeds/demo-tickets.ts).
 * Environment: BW_DEMO_HISTORY_DAYS (full-rate days, default 7; 0 = none), BW_DEMO_HISTORY_SEED (default 1),
 * BW_DEMO_HISTORY_ROLLUP_DAYS (rollup-level days on first seeding, default 396 ≈ 13 months).
 */
import { parseArgs } from 'node:util';
import pino from 'pino';
import { loadConfig } from '../config';
import { AlarmRepository } from '../data/alarm-repository';
import { createDb, describeDbError } from '../data/db';
import { HistoryRepository } from '../data/history-repository';
import { HoldRepository } from '../data/hold-repository';
import { TelemetryRepository } from '../data/telemetry-repository';
import { UnitRepository } from '../data/unit-repository';
import { DemoHistory } from '../services/demo-history';
import { QuarterModelService } from '../services/quarter-model-service';
import { RollupWorker } from '../services/rollup-worker';
import { SiteModelService } from '../services/site-model-service';
import { AuditService } from '../services/audit-service';
import { AuditRepository } from '../data/audit-repository';
import { SiteModelRepository } from '../data/site-model-repository';
import { UnitDirectory } from '../services/unit-directory';
import { seedDemoTickets } from '../../seeds/demo-tickets';
import { simulatorHistorySource } from './simulator-history';
import { attachDemoPhotos } from './demo-photos';
import { FileStore } from '../data/file-store';

const { values, positionals } = parseArgs({ args: process.argv.slice(2), allowPositionals: true, options: { now: { type: 'string' } } });
const cmd = positionals[0];
if (cmd !== 'fill' && cmd !== 'background') {
  console.error('usage: demo-history.ts fill | background [--now <ISO instant>]');
  process.exit(2);
}
const intEnv = (name: string, dflt: number, max: number) => {
  const text = process.env[name];
  if (text === undefined || text === '') return dflt;
  const n = Number(text);
  if (!Number.isInteger(n) || n < 0 || n > max) {
    console.error(`[history] ${name} must be a whole number 0…${max}, got ${text}`);
    process.exit(2);
  }
  return n;
};
const fullRateDays = intEnv('BW_DEMO_HISTORY_DAYS', 7, 7);
const rollupDays = intEnv('BW_DEMO_HISTORY_ROLLUP_DAYS', 396, 800);
const nowMs = values.now ? Date.parse(values.now) : Math.floor(Date.now() / 1000) * 1000;
if (!Number.isFinite(nowMs)) {
  console.error(`[history] --now must be an ISO instant, got ${values.now}`);
  process.exit(2);
}

const config = loadConfig();
const db = createDb(config.db);
const log = pino({ level: 'silent' });
const telemetry = new TelemetryRepository(db);
const units = new UnitDirectory(new UnitRepository(db), new HoldRepository(db));
// The full-rate days' buckets are modelled as the live rollup worker models them (the statements read those columns), in
// the background phase.
const quarterModel = new QuarterModelService(
  telemetry,
  new SiteModelService(new SiteModelRepository(db), new AuditService(new AuditRepository(db))),
  log,
);
const history = new DemoHistory(
  new HistoryRepository(db),
  telemetry,
  new AlarmRepository(db),
  new RollupWorker(telemetry, units, log),
  units,
  simulatorHistorySource(),
  {
    seed: process.env['BW_DEMO_HISTORY_SEED'] || '1',
    fullRateDays,
    rollupDays,
    faults: true,
    log: (l) => console.log(`[${l.replace(': ', '] ')}`),
    modeller: quarterModel,
  },
);
/** The work orders the past alarms would have caused (seeds/demo-tickets.ts: bulk, idempotent, pages nobody). */
async function ticketsOfThePast(atMs: number): Promise<void> {
  const n = await seedDemoTickets(db, { now: new Date(atMs) });
  if (n) console.log(`[history] ${n} ticket${n === 1 ? '' : 's'} of the past`);
}

/** Invented photos on the latest past tickets, through the same checks as an upload (before the server opens the store). */
async function photosOfThePast(): Promise<void> {
  let store: FileStore | undefined;
  try {
    store = await FileStore.open(config.files);
    const n = await attachDemoPhotos(db, store, log);
    if (n) console.log(`[history] ${n} photos of the past`);
  } catch (err) {
    console.log(`[history] no photos of the past: ${(err as Error).message}`);
  } finally {
    await store?.close();
  }
}

const t0 = performance.now();
try {
  if (cmd === 'fill') {
    const { plan, counts } = await history.fill(nowMs);
    if (plan)
      console.log(
        `[history] live: ${counts.rawRows} reports, ${counts.rollupRows} rollup rows, ${counts.weather} weather readings, ${counts.events} events, ${counts.alarms} cleared alarms in ${((performance.now() - t0) / 1000).toFixed(1)} s`,
      );
    // The fill itself took time: top up the few seconds since, so the live fleet starts where the past ends.
    for (let i = 0; plan && !values.now && i < 3; i++) if (!(await history.fill(Math.floor(Date.now() / 1000) * 1000)).plan) break;
    await ticketsOfThePast(nowMs);
    await photosOfThePast();
  } else {
    const counts = await history.background();
    console.log(
      `[history] background: ${counts.rawRows} reports, ${counts.modelled} buckets modelled, ${counts.alarms} alarms in ${((performance.now() - t0) / 1000).toFixed(1)} s`,
    );
    if (counts.alarms) await ticketsOfThePast(Date.now());
  }
} catch (err) {
  console.error(`[history] ${describeDbError(err, config.db)}`);
  process.exitCode = 1;
} finally {
  await db.destroy();
}
