/**
 * The demo fleet's past as a stream (no broker): what its units stored and forward, for the server's history loader
 * (server/scripts/demo-history.ts) to bulk-load. One JSON object per line on stdout (shared/contracts/history-stream.ts):
 *   { "k": "t", "serial", "sentMs", "r": [seq, ts, …] }    a report a unit sent (full rate; TELEMETRY_ROW_FIELDS order)
 *   { "k": "m", "serial", "leaf", "payload", "sentMs" }   another message a unit sent (events, weather; full rate)
 *   { "k": "q", "r": [serial, bucketMs, minutes, samples, poaAvgWm2, poaMaxWm2, dcPowerAvgW, energyWh] }
 *                                                           a unit's 15-minute interval (rollup level; W/m² to 0.1, W to
 *                                                           0.01, Wh to 0.001)
 *   { "k": "w", …ModelWeather }                             a weather station reading (rollup level)
 *   { "k": "truth", "serial", "fault", "start", "end" }     a fault or observed condition of the window
 *   { "k": "end", "messages", "quarters", "seconds" }       last line
 *
 *   node --import tsx simulator/history-cli.ts --mode full|rollups --from <ISO> --to <ISO> [--seed <s>] [--no-faults]
 *     [--serials A,B,…]   (only these units; default the whole demo fleet)
 */
import { parseArgs } from 'node:util';
import { TELEMETRY_ROW_FIELDS } from '../shared/contracts/history-stream';
import { parseInstant } from '../shared/solar-position';
import { demoFleetSites } from './demo-fleet';
import { fullRateHistory, HISTORY_FAULTS, rollupModelHistory } from './history';

const { values } = parseArgs({
  args: process.argv.slice(2),
  strict: true,
  options: {
    mode: { type: 'string' },
    from: { type: 'string' },
    to: { type: 'string' },
    seed: { type: 'string' },
    'no-faults': { type: 'boolean' },
    serials: { type: 'string' },
  },
});

function fail(msg: string): never {
  process.stderr.write(`[history] ${msg}\n`);
  process.exit(2);
}

if (values.mode !== 'full' && values.mode !== 'rollups') fail(`--mode must be full or rollups, got ${values.mode ?? 'nothing'}`);
if (!values.from || !values.to) fail('--from and --to (ISO instants with offset) are required');
const fromMs = parseInstant(values.from, '--from').unixMs;
const toMs = parseInstant(values.to, '--to').unixMs;
if (!(fromMs < toMs)) fail(`--to must be after --from (${values.from} … ${values.to})`);
const seed = values.seed ?? '1';
const faults = values['no-faults'] ? {} : HISTORY_FAULTS;

// Lines are collected into ~1 MB writes; stdout to a pipe is synchronous on Linux, which paces the generator to the reader.
let buf: string[] = [];
let bufLen = 0;
const flush = () => {
  if (!buf.length) return;
  process.stdout.write(buf.join(''));
  buf = [];
  bufLen = 0;
};
const line = (o: object) => {
  const s = `${JSON.stringify(o)}\n`;
  buf.push(s);
  bufLen += s.length;
  if (bufLen > 1 << 20) flush();
};

const round = (x: number, per: number) => Math.round(x * per) / per;
const t0 = performance.now();
let messages = 0;
let quarters = 0;
// Only the units asked for (the server's units); sites left without units drop out.
const wanted = values.serials ? new Set(values.serials.split(',')) : null;
const sites = demoFleetSites()
  .map((s) => ({ ...s, units: s.units.filter((u) => !wanted || wanted.has(u.serial)) }))
  .filter((s) => s.units.length > 0);
const truth =
  values.mode === 'full'
    ? fullRateHistory(sites, { fromMs, toMs, seed, faults }, (batch) => {
        for (const { message, sentMs } of batch) {
          if (message.leaf === 'telemetry') {
            const t = message.payload;
            line({ k: 't', serial: message.serial, sentMs, r: TELEMETRY_ROW_FIELDS.map((f) => t[f]) });
          } else line({ k: 'm', serial: message.serial, leaf: message.leaf, payload: message.payload, sentMs });
        }
        messages += batch.length;
      })
    : rollupModelHistory(sites, { fromMs, toMs, seed, faults }, (qs, ws) => {
        // Quarters are most of the stream: one compact row each, rounded to what a rollup needs.
        for (const q of qs)
          line({
            k: 'q',
            r: [
              q.serial,
              q.bucketMs,
              q.minutes,
              q.samples,
              round(q.poaAvgWm2, 10),
              round(q.poaMaxWm2, 10),
              round(q.dcPowerAvgW, 100),
              round(q.energyWh, 1000),
            ],
          });
        for (const w of ws) line({ k: 'w', ...w });
        quarters += qs.length;
      });
for (const r of truth) line({ k: 'truth', ...r });
line({ k: 'end', messages, quarters, seconds: Math.round(performance.now() - t0) / 1000 });
flush();
