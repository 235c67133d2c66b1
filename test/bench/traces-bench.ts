/**
 * `npm run bench:traces [-- --days 30 --points 2000 --runs 7 --json]`
 *
 * One unit's month of 5-second telemetry (≈518k rows) in a fresh database on the private bench MariaDB, then the
 * trace explorer's downsampling (min/max per bucket of every quantity, computed in SQL) timed over several runs.
 * Prints a readable line; with --json the last stdout line is `{ "rows", "points", "ms" }` (ms = median).
 */
import { parseArgs } from 'node:util';
import { createTestDatabase } from '../helpers/test-db';
import { TraceRepository } from '../../server/data/trace-repository';
import { TelemetryRepository } from '../../server/data/telemetry-repository';
import { TraceService } from '../../server/services/trace-service';
import type { Unit } from '../../shared/contracts/api';

const { values: args } = parseArgs({
  options: {
    days: { type: 'string', default: '30' },
    points: { type: 'string', default: '2000' },
    runs: { type: 'string', default: '7' },
    json: { type: 'boolean', default: false },
  },
});
const DAYS = Number(args.days);
const POINTS = Number(args.points);
const RUNS = Number(args.runs);
const say = (...a: unknown[]) => (args.json ? console.error(...a) : console.log(...a));

async function main() {
  const testDb = await createTestDatabase({ env: { BW_LOG_LEVEL: 'silent' } });
  const { db } = testDb;
  try {
    const [ownerId] = await db('owners').insert({ name: 'Bench Owner' });
    const [siteId] = await db('sites').insert({
      owner_id: ownerId,
      name: 'Bench Site',
      latitude_deg: 53.5,
      longitude_deg: 10,
      elevation_m: 10,
      time_zone: 'Europe/Berlin',
      albedo: 0.2,
    });
    const [unitId] = await db('units').insert({
      serial: 'BT-000001',
      site_id: siteId,
      rated_power_wp: 420,
      detector_tilt_deg: 10,
      firmware: '2.4.1',
      device_secret_hash: 'x',
    });

    // A month of 5-second reports: a daily irradiance arch with noise, loaded 5,000 rows per INSERT.
    const start = Date.parse('2026-05-01T00:00:00Z');
    const total = Math.round((DAYS * 86_400) / 5);
    const loadStarted = performance.now();
    const chunk = 5000;
    const fmt = (ms: number) => `'${new Date(ms).toISOString().slice(0, 23).replace('T', ' ')}'`;
    for (let i = 0; i < total; i += chunk) {
      const tuples: string[] = [];
      for (let k = i; k < Math.min(total, i + chunk); k++) {
        const ts = start + k * 5000;
        const hour = ((ts / 3_600_000) % 24) - 4;
        const sun = Math.max(0, Math.sin((Math.PI * hour) / 16));
        const poaN = 900 * sun + (k % 17);
        const poa = poaN.toFixed(1);
        const p = (sun * 380).toFixed(1);
        tuples.push(
          `(${unitId},${fmt(ts)},${k},${(poaN * 0.98 + 3).toFixed(1)},${(poaN * 0.98).toFixed(1)},${poa},${poa},${poa},` +
            `${(30 + 20 * sun).toFixed(2)},${(90 + 180 * (hour / 16)).toFixed(2)},${(30 + 20 * sun).toFixed(2)},${(90 + 180 * (hour / 16)).toFixed(2)},0.1,0.1,${p},25,'settled',${fmt(ts)})`,
        );
      }
      await db.raw(
        `INSERT INTO telemetry (unit_id, ts, seq, tilt_plus_wm2, tilt_minus_wm2, azimuth_plus_wm2, azimuth_minus_wm2, poa_wm2, tilt_deg, azimuth_deg,
          cmd_tilt_deg, cmd_azimuth_deg, tilt_motor_a, azimuth_motor_a, dc_power_w, module_temp_c, mode, received_at) VALUES ${tuples.join(',')}`,
      );
    }
    const loadMs = performance.now() - loadStarted;
    say(`loaded ${total.toLocaleString('en')} rows (${DAYS} days of 5-second reports) in ${(loadMs / 1000).toFixed(1)} s`);
    // The server keeps the 1-minute rollup current as data arrives; build it here the same way, a day at a time.
    const rollupStarted = performance.now();
    const telemetry = new TelemetryRepository(db);
    for (let d = 0; d < DAYS; d++)
      await telemetry.rollupMinuteRange([unitId!], new Date(start + d * 86_400_000), new Date(start + (d + 1) * 86_400_000));
    say(`built the 1-minute rollup in ${((performance.now() - rollupStarted) / 1000).toFixed(1)} s`);

    const unit = { id: unitId, serial: 'BT-000001', siteId } as Unit;
    const service = new TraceService(new TraceRepository(db));
    const from = new Date(start);
    const to = new Date(start + DAYS * 86_400_000);
    await service.traces(unit, from, to, POINTS); // warm the buffer pool
    const times: number[] = [];
    let rows = 0;
    let points = 0;
    for (let r = 0; r < RUNS; r++) {
      const t0 = performance.now();
      const res = await service.traces(unit, from, to, POINTS);
      times.push(performance.now() - t0);
      rows = res.rows;
      points = res.t.length;
    }
    times.sort((a, b) => a - b);
    const median = Math.round(times[Math.floor(times.length / 2)]!);
    say(
      `downsampled ${rows.toLocaleString('en')} rows to ${points} buckets (min/max of 12 quantities): median ${median} ms over ${RUNS} runs ` +
        `(min ${Math.round(times[0]!)} ms, max ${Math.round(times.at(-1)!)} ms); target ≤ 300 ms`,
    );
    if (args.json) console.log(JSON.stringify({ rows, points, ms: median }));
  } finally {
    await testDb.drop();
  }
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err);
    process.exit(1);
  },
);
