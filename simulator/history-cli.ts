/**
 * The demo fleet's past as a stream (no broker): what its units stored and forward, for the server's history loader
 * (server/scripts/demo-history.ts) to bulk-load. One JSON object per line on stdout (shared/contracts/history-stream.ts):
 *   { "k": "t", "serial", "sentMs", "r": [seq, ts, …] }    a report a unit sent (full rate; TELEMETRY_ROW_FIELDS order)
 *   { "k": "m", "serial", "leaf", "payload", "sentMs" }   another message a unit sent (events, weather; full rate)
 *   { "k": "q", "r": [serial, bucketMs, minutes, samples, poaAvgWm2, …] }
 *                                                           a unit's 15-minute interval (rollup level; QUARTER_ROW_FIELDS
 *                                                           order; W/m² to 0.1, W, °C and ° to 0.01, Wh and minutes to
 *                                                           0.001)
 *   { "k": "w", …ModelWeather }                             a weather station reading (rollup level)
 *   { "k": "truth", "serial", "fault", "start", "end" }     a fault or observed condition of the window
 *   { "k": "end", "messages", "quarters", "seconds" }       last line
 *
 *   node --import tsx simulator/history-cli.ts --mode full|rollups --from <ISO> --to <ISO> [--seed <s>] [--no-faults]
 *     [--serials A,B,…]   (only these units; default the whole demo fleet)
 */
import { parseArgs } from 'node:util';
import { QUARTER_ROW_FIELDS, TELEMETRY_ROW_FIELDS, type HistoryQuarter } from '../shared/contracts/history-stream';
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
const text = (s: string) => {
  buf.push(s);
  bufLen += s.length;
  if (bufLen > 1 << 20) flush();
};
const line = (o: object) => text(`${JSON.stringify(o)}\n`);

/** Steps per unit each quarter field is rounded to (what a rollup needs). */
const ROUNDING: Record<Exclude<keyof HistoryQuarter, 'serial'>, number> = {
  bucketMs: 1,
  minutes: 1,
  samples: 1,
  poaAvgWm2: 10,
  poaMaxWm2: 10,
  dcPowerAvgW: 100,
  energyWh: 1000,
  moduleTempC: 100,
  tiltDeg: 100,
  azimuthDeg: 100,
  seekingMin: 1000,
  settledMin: 1000,
  stowedMin: 1000,
  modelUnitWm2: 10,
  modelBestWm2: 10,
  modelFixedWm2: 10,
  modelSunWm2: 10,
};
/** The numeric fields in stream order (QUARTER_ROW_FIELDS after the serial) with their rounding. */
const STEPS = QUARTER_ROW_FIELDS.slice(1).map((f) => [f, ROUNDING[f as Exclude<typeof f, 'serial'>]]) as [keyof typeof ROUNDING, number][];
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
        for (const q of qs) {
          // Written by hand, not through JSON.stringify of a row: quarters are most of the stream (millions of lines).
          let t = `{"k":"q","r":[${JSON.stringify(q.serial)}`;
          for (const [f, per] of STEPS) t += `,${Math.round(q[f] * per) / per}`;
          text(`${t}]}\n`);
        }
        for (const w of ws) line({ k: 'w', ...w });
        quarters += qs.length;
      });
for (const r of truth) line({ k: 'truth', ...r });
line({ k: 'end', messages, quarters, seconds: Math.round(performance.now() - t0) / 1000 });
flush();
