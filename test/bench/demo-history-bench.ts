/**
 * `npm run bench:demo-history [-- --units 24 --days 7 --rollup-days 396 --json]`
 *
 * The demo's past in a fresh demo database on the private bench MariaDB: the first phase (what `npm start` waits for:
 * rollup-level past, the last day at full rate, the past alarms) and then the background full-rate days, each timed.
 * `--units n` takes the first n demo units (default all). Prints readable lines; with --json the last stdout line is
 * `{ "units", "fullRateHours", "rawRows", "rollupRows", "alarms", "secondsToLive", "secondsTotal" }`.
 * Run it on a quiet machine: it uses both cores (the simulator's history stream and MariaDB).
 */
import { parseArgs } from 'node:util';
import pino from 'pino';
import { AlarmRepository } from '../../server/data/alarm-repository';
import { HistoryRepository } from '../../server/data/history-repository';
import { HoldRepository } from '../../server/data/hold-repository';
import { TelemetryRepository } from '../../server/data/telemetry-repository';
import { UnitRepository } from '../../server/data/unit-repository';
import { simulatorHistorySource } from '../../server/scripts/simulator-history';
import { DemoHistory } from '../../server/services/demo-history';
import { AuditRepository } from '../../server/data/audit-repository';
import { SiteModelRepository } from '../../server/data/site-model-repository';
import { AuditService } from '../../server/services/audit-service';
import { QuarterModelService } from '../../server/services/quarter-model-service';
import { RollupWorker } from '../../server/services/rollup-worker';
import { SiteModelService } from '../../server/services/site-model-service';
import { UnitDirectory } from '../../server/services/unit-directory';
import { demoSerials } from '../../shared/demo-world';
import { createTestDatabase } from '../helpers/test-db';

const { values: args } = parseArgs({
  options: {
    units: { type: 'string' },
    days: { type: 'string', default: '7' },
    'rollup-days': { type: 'string', default: '396' },
    json: { type: 'boolean', default: false },
  },
});
const say = (...a: unknown[]) => (args.json ? console.error(...a) : console.log(...a));
const serials = args.units ? demoSerials().slice(0, Number(args.units)) : demoSerials();

async function main() {
  const t = await createTestDatabase({ seed: true, env: { BW_LOG_LEVEL: 'silent' } });
  try {
    const telemetry = new TelemetryRepository(t.db);
    const units = new UnitDirectory(new UnitRepository(t.db), new HoldRepository(t.db));
    const siteModel = new SiteModelService(new SiteModelRepository(t.db), new AuditService(new AuditRepository(t.db)));
    const modeller = new QuarterModelService(telemetry, siteModel, pino({ level: 'silent' }));
    const history = new DemoHistory(
      new HistoryRepository(t.db),
      telemetry,
      new AlarmRepository(t.db),
      new RollupWorker(telemetry, units, pino({ level: 'silent' })),
      units,
      simulatorHistorySource(),
      { seed: '1', fullRateDays: Number(args.days), rollupDays: Number(args['rollup-days']), faults: true, serials, log: say, modeller },
    );
    const now = Math.floor(Date.now() / 1000) * 1000;
    const t0 = performance.now();
    const first = await history.fill(now);
    const secondsToLive = (performance.now() - t0) / 1000;
    say(`first phase: ${JSON.stringify(first.counts)} in ${secondsToLive.toFixed(1)} s`);
    const rest = await history.background();
    const secondsTotal = (performance.now() - t0) / 1000;
    say(`background: ${JSON.stringify(rest)}; total ${secondsTotal.toFixed(1)} s`);
    const [{ n: rollupRows }] = (await t.db('telemetry_15m').count({ n: '*' })) as [{ n: number }];
    const [{ n: rawRows }] = (await t.db('telemetry').count({ n: '*' })) as [{ n: number }];
    const [{ n: alarms }] = (await t.db('alarms').count({ n: '*' })) as [{ n: number }];
    const out = {
      units: serials.length,
      fullRateHours: Math.round((now - (first.plan?.backgroundFromMs ?? now)) / 360_000) / 10,
      rawRows: Number(rawRows),
      rollupRows: Number(rollupRows),
      alarms: Number(alarms),
      secondsToLive: Math.round(secondsToLive * 10) / 10,
      secondsTotal: Math.round(secondsTotal * 10) / 10,
    };
    console.log(args.json ? JSON.stringify(out) : out);
  } finally {
    await t.drop();
  }
}

await main();
