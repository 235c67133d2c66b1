/**
 * Benchmark: N simulated units at one telemetry report per second from one process, publishing over real MQTT.
 * Measures the simulator process only (simulation + JSON encoding + mqtt.js publishing, QoS 1): reports handed to the
 * network per second and its CPU (% of one core). The broker (aedes, accepting any unit serial) runs in a separate child
 * process so its CPU is not counted.
 *   npm run bench:simulator -- [--units 2000] [--seconds 20] [--json]
 */
import { fork } from 'node:child_process';
import { parseArgs } from 'node:util';
import { wallClock, acceleratedClock } from '../clock';
import { createFleet } from '../fleet';
import { createPublisher } from '../publisher';
import { createRng } from '../rng';
import { demoSiteInfo } from '../demo-fleet';

async function brokerChild(): Promise<void> {
  const { startBroker } = await import('../../broker/broker');
  const { unitPrefix, unitTopic } = await import('../../shared/contracts/topics');
  const b = await startBroker({
    host: '127.0.0.1',
    port: 0,
    unitPrefix,
    limits: { maxPendingConnections: 100_000 }, // every unit connects at once here
    authenticate: async (u) => (/^BENCH-\d+$/.test(u) ? { kind: 'unit', serial: u } : null),
  });
  let received = 0;
  b.aedes.subscribe(
    unitTopic('+', 'telemetry'),
    (_p, cb) => {
      received++;
      cb();
    },
    () => {},
  );
  process.send!({ port: b.port });
  process.on('message', (m: { cmd: string }) => {
    if (m.cmd === 'count') process.send!({ received });
    if (m.cmd === 'stop') void b.close().then(() => process.exit(0));
  });
}

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: { units: { type: 'string' }, seconds: { type: 'string' }, json: { type: 'boolean' }, child: { type: 'boolean' } },
  });
  if (values.child) return brokerChild();
  const units = Number(values.units ?? 2000);
  const seconds = Number(values.seconds ?? 20);
  const child = fork(new URL(import.meta.url).pathname, ['--child'], { execArgv: ['--import', 'tsx'] });
  const port = await new Promise<number>((res) => child.once('message', (m: { port: number }) => res(m.port)));
  const ask = () =>
    new Promise<number>((res) => {
      child.once('message', (m: { received: number }) => res(m.received));
      child.send({ cmd: 'count' });
    });
  const site = demoSiteInfo('QED');
  const start = Date.parse('2026-04-20T10:00:00Z');
  const fleet = createFleet(
    {
      sites: [
        {
          site,
          scenario: 'broken-cloud',
          units: Array.from({ length: units }, (_, i) => ({
            serial: `BENCH-${i + 1}`,
            siteCode: 'QED',
            controller: { reportIntervalS: 1 },
            weatherStation: i === 0,
          })),
        },
      ],
      startUnixMs: start,
    },
    { rng: createRng('bench') },
  );
  const real = wallClock();
  const pub = createPublisher(fleet, { url: `mqtt://127.0.0.1:${port}`, secretOf: () => 'bench', now: () => fleet.now() });
  await pub.start(120_000);
  const clock = acceleratedClock(real, start, 1);
  let sent = 0;
  let counting = false;
  const timer = setInterval(() => {
    const n = pub.publish(fleet.advanceTo(clock.now()));
    if (counting) sent += n;
  }, 100);
  await new Promise((r) => setTimeout(r, 3000)); // warm-up
  counting = true;
  const c0 = process.cpuUsage();
  const t0 = real.now();
  const r0 = await ask();
  await new Promise((r) => setTimeout(r, seconds * 1000));
  const c1 = process.cpuUsage(c0);
  const elapsedS = (real.now() - t0) / 1000;
  const r1 = await ask();
  clearInterval(timer);
  await pub.stop();
  child.send({ cmd: 'stop' });
  const reportsPerSec = Math.round(sent / elapsedS);
  const cpuPct = Math.round(((c1.user + c1.system) / 1000 / (elapsedS * 1000)) * 1000) / 10;
  if (!values.json) {
    process.stderr.write(
      `${units} units, ${elapsedS.toFixed(1)} s: ${sent} messages sent (${reportsPerSec}/s), broker received ${Math.round((r1 - r0) / elapsedS)} telemetry/s; simulator CPU ${cpuPct} % of one core\n`,
    );
  }
  process.stdout.write(`${JSON.stringify({ units, reportsPerSec, cpuPct })}\n`);
  process.exit(0);
}

void main();
