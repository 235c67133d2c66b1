/**
 * `npm run bench:statement [-- --units 100 --runs 5 --json]`
 *
 * A site of `--units` units with a month of 15-minute rows carrying the statements' columns (module temperature,
 * orientation, minutes per mode, the four modelled irradiances), a few stows, holds, outages and traps, and tickets,
 * in a fresh demo database on the private bench MariaDB; then the owner's statement of that month over HTTP
 * (`GET /api/sites/:id/statements/2026-11`, what an owner waits for), timed over several runs, with its two parts timed
 * apart: the read of the month's rows (StatementRepository) and the arithmetic (computeStatement). The PDF is timed too
 * when the server has the route. Prints readable lines; with --json the last stdout line is
 * `{ "units", "days", "ms" }` (ms = median of the JSON statement; "pdfMs" when there is a PDF). Target ≤ 500 ms for
 * 100 units on this machine. Run it on a quiet machine.
 */
import { parseArgs } from 'node:util';
import request from 'supertest';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import { HistoryRepository, type QuarterRow } from '../../server/data/history-repository';
import { emptyStatementColumns, StatementRepository } from '../../server/data/statement-repository';
import { computeStatement } from '../../server/services/statement-figures';
import { MODULE_POWER_TEMP_COEFF_PER_K } from '../../shared/contracts/pv-module';
import { localMonth } from '../../shared/pv-performance';
import { startTestStack } from '../helpers/test-stack';

const { values: args } = parseArgs({
  options: {
    units: { type: 'string', default: '100' },
    runs: { type: 'string', default: '5' },
    json: { type: 'boolean', default: false },
  },
});
const UNITS = Number(args.units);
const RUNS = Number(args.runs);
if (!Number.isInteger(UNITS) || UNITS < 1 || UNITS > 2000) throw new RangeError(`--units: a whole number 1…2000; got ${args.units}`);
if (!Number.isInteger(RUNS) || RUNS < 1 || RUNS > 100) throw new RangeError(`--runs: a whole number 1…100; got ${args.runs}`);
const say = (...a: unknown[]) => (args.json ? console.error(...a) : console.log(...a));

const MONTH = '2026-11';
const TZ = 'Europe/Berlin';
const Q = 15 * 60_000;
const P0_WP = 420;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

async function timed<T>(f: () => Promise<T>): Promise<{ ms: number; value: T }> {
  const t0 = performance.now();
  const value = await f();
  return { ms: performance.now() - t0, value };
}

async function main() {
  const stack = await startTestStack({ seed: true, env: { BW_LOG_LEVEL: 'silent' } });
  const db = stack.db;
  try {
    const owner = (await db('owners').first('id')) as { id: number };
    const [siteId] = await db('sites').insert({
      owner_id: owner.id,
      name: 'Statement bench site',
      latitude_deg: 52.52,
      longitude_deg: 13.4,
      elevation_m: 40,
      time_zone: TZ,
      albedo: 0.2,
    });
    const unitIds: number[] = [];
    for (let i = 0; i < UNITS; i += 500) {
      const rows = Array.from({ length: Math.min(500, UNITS - i) }, (_, k) => ({
        serial: `SB-${String(i + k + 1).padStart(5, '0')}`,
        site_id: siteId,
        rated_power_wp: P0_WP,
        detector_tilt_deg: 10,
        firmware: 'bench',
        device_secret_hash: 'sha256:00',
      }));
      await db('units').insert(rows);
    }
    unitIds.push(...(await db('units').where({ site_id: siteId }).orderBy('id').pluck('id')));

    // A month of an invented November sky: a daylight arch 07:30–16:30 local (peak 500 W/m² at the best orientation,
    // fixed-tilt twin 70 % and sun-following twin 98 % of it); per unit a few stowed, held, missing and trapped hours.
    const lm = localMonth(MONTH, TZ);
    const days = lm.days.length;
    const loadStart = performance.now();
    const history = new HistoryRepository(db);
    let rows: QuarterRow[] = [];
    let n = 0;
    for (const [k, unitId] of unitIds.entries()) {
      for (let b = lm.fromMs, i = 0; b < lm.toMs; b += Q, i++) {
        const localH = ((b - lm.fromMs) / 3_600_000) % 24; // November in Berlin: UTC+1 all month
        const x = (localH + 0.125 - 7.5) / 9;
        const best = x > 0 && x < 1 ? 500 * Math.sin(Math.PI * x) : 0;
        const day = Math.floor(i / 96);
        const hour = Math.floor(localH);
        const event = (day * 7 + k * 3) % 29 === 0 && hour >= 10 && hour < 12 ? ['stow', 'hold', 'missing', 'trap'][(day + k) % 4] : null;
        if (event === 'missing') continue;
        const atUnit = event === 'trap' ? best * 0.7 : event === 'stow' ? best * 0.5 : best;
        const down = event === 'hold';
        const poa = down ? 0 : atUnit;
        const moduleC = 6 + poa * (25 / 800);
        const dc = ((P0_WP * poa) / 1000) * 0.92;
        rows.push({
          unitId,
          bucket: new Date(b),
          minutes: 15,
          samples: 180,
          poaAvgWm2: poa,
          poaMaxWm2: poa,
          dcPowerAvgW: dc,
          energyWh: dc / 4,
          moduleTempC: moduleC,
          tiltDeg: event === 'stow' ? 0 : 60,
          azimuthDeg: 180,
          modeMinutes: [0, event ? 0 : 15, 0, event === 'stow' ? 15 : 0, event === 'hold' ? 15 : 0, 0],
          modelUnitWm2: atUnit,
          modelBestWm2: best,
          modelFixedWm2: best * 0.7,
          modelSunWm2: best * 0.98,
        });
        if (rows.length >= 50_000) {
          n += await history.insertQuarters(rows);
          rows = [];
        }
      }
    }
    n += await history.insertQuarters(rows);
    // Tickets: one a day on some unit, two hours each, of the categories the statements know.
    const categories = ['forced-outage', 'scheduled-maintenance', 'requested-shutdown', 'out-of-environmental-specification'];
    const tickets = lm.days.map((d, i) => {
      const opened = new Date(d.fromMs + 9 * 3_600_000);
      return {
        site_id: siteId,
        unit_id: unitIds[(i * 13) % unitIds.length],
        kind: 'manual',
        severity: 'P3',
        title: `Bench ticket ${i + 1}`,
        state: 'closed',
        opened_at: opened,
        acknowledge_due_at: opened,
        on_site_due_at: opened,
        fix_due_at: opened,
        resolved_at: new Date(opened.getTime() + 2 * 3_600_000),
        closed_at: new Date(opened.getTime() + 3 * 3_600_000),
        availability_category: categories[i % categories.length],
        parts: '[]',
      };
    });
    await db('tickets').insert(tickets);
    say(
      `built ${UNITS} units × ${days} days: ${n.toLocaleString('en')} 15-minute rows and ${tickets.length} tickets in ${((performance.now() - loadStart) / 1000).toFixed(1)} s`,
    );

    const admin = request.agent(stack.http);
    await admin.post('/api/auth/sign-in').send({ email: 'admin@saltmarsh.example', password: DEMO_PASSWORD }).expect(200);
    const url = `/api/sites/${siteId}/statements/${MONTH}`;
    const first = await timed(() => admin.get(url).expect(200));
    const times: number[] = [];
    for (let r = 0; r < RUNS; r++) times.push((await timed(() => admin.get(url).expect(200))).ms);
    const ms = Math.round(median(times));
    const s = first.value.body as { site: { energyKwh: number; modelledShare: number; gains: { gainOverFixedPct: number | null } } };

    // The two parts apart, on the same rows.
    const repo = new StatementRepository(db);
    const units = await repo.units(siteId!);
    const reads: number[] = [];
    let columns = emptyStatementColumns(unitIds, lm.fromMs, lm.toMs);
    for (let r = 0; r < RUNS; r++) {
      const t = await timed(() => repo.quarterColumns(unitIds, lm.fromMs, lm.toMs));
      reads.push(t.ms);
      columns = t.value;
    }
    const [tk, al] = await Promise.all([repo.tickets(siteId!, lm.fromMs, lm.toMs), repo.alarms(siteId!, lm.fromMs, lm.toMs)]);
    const sums: number[] = [];
    for (let r = 0; r < RUNS; r++) {
      const t0 = performance.now();
      computeStatement({
        site: { latitudeDeg: 52.52, longitudeDeg: 13.4, elevationM: 40, timeZone: TZ },
        month: lm,
        untilMs: Date.now(),
        units,
        columns,
        tickets: tk,
        alarms: al,
        gammaPerK: MODULE_POWER_TEMP_COEFF_PER_K,
      });
      sums.push(performance.now() - t0);
    }

    // The PDF, when the server has it.
    let pdfMs: number | undefined;
    const probe = await admin.get(`${url}.pdf`);
    if (probe.status === 200 && String(probe.headers['content-type']).startsWith('application/pdf')) {
      const pdfTimes: number[] = [];
      for (let r = 0; r < RUNS; r++) pdfTimes.push((await timed(() => admin.get(`${url}.pdf`).expect(200))).ms);
      pdfMs = Math.round(median(pdfTimes));
    }

    say(
      `statement of ${MONTH} for ${UNITS} units (${columns.rows.toLocaleString('en')} rows, ${tk.length} tickets): ` +
        `median ${ms} ms over ${RUNS} runs (min ${Math.round(Math.min(...times))}, max ${Math.round(Math.max(...times))}; first ${Math.round(first.ms)}); target ≤ 500 ms`,
    );
    say(`  read of the month's rows: median ${Math.round(median(reads))} ms; arithmetic: median ${Math.round(median(sums))} ms`);
    say(
      `  energy ${s.site.energyKwh} kWh, modelled share ${s.site.modelledShare}, gain over fixed tilt ${s.site.gains.gainOverFixedPct} %` +
        (pdfMs === undefined ? '; no PDF route on this server (not timed)' : `; PDF median ${pdfMs} ms`),
    );
    if (args.json) console.log(JSON.stringify({ units: UNITS, days, ms, ...(pdfMs === undefined ? {} : { pdfMs }) }));
  } finally {
    await stack.stop();
  }
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err);
    process.exit(1);
  },
);
