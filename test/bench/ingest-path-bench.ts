/**
 * `npm run bench:ingest-path [-- --units 10000 --readings 200000 --night --cpu-profile <file> --json]`
 *
 * The server's CPU per reading on the ingest path without MQTT: the whole server runs in this process (startStack, its
 * own MariaDB) and telemetry is handed to the ingest directly (`ingest.receive`, as the broker's hook does), up to one
 * reading in flight per unit, as fast as batches commit. So the figure covers validation, batching, the insert, the
 * health detectors and the live state, and leaves out aedes and the sockets (bench:ingest has both). Closed loop and
 * CPU time only: it holds up on a busy machine far better than an open-loop rate does. The site sits at solar noon
 * (`--night`: at midnight) and every unit reports as a healthy settled unit, as in bench:ingest.
 * Prints `{ units, readings, serverCpuUsPerMsg, readingsPerSec, daylight }` (the payloads' own cost taken out).
 */
import { writeFileSync } from 'node:fs';
import { Session } from 'node:inspector/promises';
import { parseArgs } from 'node:util';
import { pino } from 'pino';
import { loadConfig } from '../../server/config';
import { globalMaxOf } from '../../server/health/site-sky';
import { hashDeviceSecret } from '../../server/services/device-secret';
import { DEFAULT_HEALTH_SERVICE_OPTIONS } from '../../server/services/health-service';
import { startStack } from '../../server/stack';
import { detectorReadings } from '../../shared/landscape';
import { declinationCooperDeg } from '../../shared/solar-position/declination-cooper-1969';
import { equationOfTimeSpencerMin } from '../../shared/solar-position/equation-of-time-spencer-1971';
import { createTestDatabase } from '../helpers/test-db';

const { values: args } = parseArgs({
  options: {
    units: { type: 'string', default: '10000' },
    readings: { type: 'string', default: '200000' },
    night: { type: 'boolean', default: false },
    'cpu-profile': { type: 'string' },
    json: { type: 'boolean', default: false },
  },
});
const UNITS = Number(args.units);
const READINGS = Number(args.readings);
const DETECTOR_TILT_DEG = 20;

async function main() {
  const testDb = await createTestDatabase({ env: { BW_LOG_LEVEL: 'silent' } });
  const { db } = testDb;
  const now = Date.now();
  const d = new Date(now);
  const dayOfYear = Math.floor((now - Date.UTC(d.getUTCFullYear(), 0, 1)) / 86_400_000) + 1;
  // Solar noon (or midnight) here now, the sun 70° high at noon: see bench:ingest.
  const noonLon = (12 - d.getUTCHours() - d.getUTCMinutes() / 60 - equationOfTimeSpencerMin(dayOfYear) / 60) * 15 + (args.night ? 180 : 0);
  const [ownerId] = await db('owners').insert({ name: 'Bench Owner' });
  const [siteId] = await db('sites').insert({
    owner_id: ownerId,
    name: 'Bench Site',
    latitude_deg: declinationCooperDeg(dayOfYear) - 20,
    longitude_deg: ((((noonLon + 180) % 360) + 360) % 360) - 180,
    elevation_m: 100,
    time_zone: 'UTC',
    albedo: 0.2,
  });
  const serials = Array.from({ length: UNITS }, (_, i) => `BN-${String(i).padStart(6, '0')}`);
  const hash = hashDeviceSecret('bench-device-secret');
  for (let i = 0; i < serials.length; i += 2000)
    await db('units').insert(
      serials.slice(i, i + 2000).map((serial) => ({
        serial,
        site_id: siteId,
        rated_power_wp: 400,
        detector_tilt_deg: DETECTOR_TILT_DEG,
        firmware: '2.4.1',
        device_secret_hash: hash,
      })),
    );
  const base = loadConfig({ ...process.env, BW_LOG_LEVEL: 'silent' });
  let committed = 0;
  const stack = await startStack(
    { ...testDb.config, port: 0, broker: { ...base.broker, port: 0 }, db: { ...testDb.config.db, poolMax: 8 } },
    pino({ level: 'warn' }),
    {
      ingest: { flushConcurrency: 4 },
      rollupIntervalMs: 5000,
      warmLandscapes: false,
      listeners: { committed: (rows) => void (committed += rows.length) },
    },
  );
  const { sky } = await stack.siteModel.skyAt(Number(siteId), Date.now());
  const best = globalMaxOf(sky, DEFAULT_HEALTH_SERVICE_OPTIONS.maxTiltDeg);
  const r = detectorReadings(sky, best.tiltDeg, best.azimuthDeg, DETECTOR_TILT_DEG);
  const r1 = (x: number) => Math.round(x * 10) / 10;
  const fixed = `"tiltPlusWm2":${r1(r.tiltPlusWm2)},"tiltMinusWm2":${r1(r.tiltMinusWm2)},"azimuthPlusWm2":${r1(r.azimuthPlusWm2)},"azimuthMinusWm2":${r1(r.azimuthMinusWm2)},"poaWm2":${r1(r.panelWm2)},"tiltDeg":${r1(best.tiltDeg)},"azimuthDeg":${r1(best.azimuthDeg)},"cmdTiltDeg":${r1(best.tiltDeg)},"cmdAzimuthDeg":${r1(best.azimuthDeg)},"tiltMotorA":0.1,"azimuthMotorA":0.05,"dcPowerW":${r1(0.34 * r.panelWm2)},"moduleTempC":31,"mode":"settled","firmware":"2.4.1"}`;
  const seq = new Array<number>(UNITS).fill(0);
  const lastTs = new Array<number>(UNITS).fill(0);
  const payload = (i: number) => {
    lastTs[i] = Math.max(Date.now(), lastTs[i]! + 1);
    return Buffer.from(`{"v":1,"seq":${seq[i]!++},"ts":"${new Date(lastTs[i]!).toISOString()}",${fixed}`);
  };
  // What making the payloads costs this process, taken out of the figure (a unit makes its own).
  const g0 = process.cpuUsage();
  for (let k = 0; k < 20_000; k++) payload(k % UNITS);
  const g = process.cpuUsage(g0);
  const payloadUs = (g.user + g.system) / 20_000;
  await new Promise((res) => setTimeout(res, 1500)); // the site model is built in the background

  let cursor = 0;
  let sent = 0;
  let acked = 0;
  const run = (total: number) =>
    new Promise<void>((resolve) => {
      const start = sent;
      const startAcked = acked;
      const pump = () => {
        while (sent - acked < UNITS && sent - start < total) {
          const i = cursor;
          cursor = (cursor + 1) % UNITS;
          sent++;
          stack.ingest.receive(serials[i]!, 'telemetry', payload(i), () => {
            if (++acked - startAcked === total) resolve();
          });
        }
        if (sent - start < total) setTimeout(pump, 5);
      };
      pump();
    });
  await run(Math.min(50_000, Math.ceil(READINGS / 4))); // warm-up: JIT, pools, detector state
  const session = new Session();
  if (args['cpu-profile']) {
    session.connect();
    await session.post('Profiler.enable');
    await session.post('Profiler.start');
  }
  const c0 = process.cpuUsage();
  const k0 = committed;
  const t0 = performance.now();
  await run(READINGS);
  const c = process.cpuUsage(c0);
  const seconds = (performance.now() - t0) / 1000;
  const n = committed - k0;
  if (args['cpu-profile']) {
    const { profile } = await session.post('Profiler.stop');
    writeFileSync(args['cpu-profile'], JSON.stringify(profile));
    session.disconnect();
  }
  await stack.stop();
  await testDb.drop();
  const result = {
    units: UNITS,
    readings: n,
    serverCpuUsPerMsg: Math.round(((c.user + c.system) / n - payloadUs) * 10) / 10,
    readingsPerSec: Math.round(n / seconds),
    daylight: !args.night,
  };
  if (args.json) console.log(JSON.stringify(result));
  else console.log(result);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
