import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import { csvField } from '../../shared/csv/csv-field';
import { TelemetryRepository } from '../../server/data/telemetry-repository';
import type { UnitTraces } from '../../shared/contracts/traces';

let stack: Awaited<ReturnType<typeof startTestStack>>;
let unitId: number;
let otherOwnersUnit: number;
const T0 = Date.parse('2026-06-10T08:00:00Z');
const ROWS = 2 * 720; // two hours of 5-second reports
const SPIKE_AT = T0 + 3000 * 1000; // inside bucket 5 of 12 (10-minute buckets)

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const unit = await stack
    .db('units')
    .join('sites', 'sites.id', 'units.site_id')
    .where('sites.name', 'Eastfield Depot Yard')
    .first('units.id');
  unitId = unit.id;
  otherOwnersUnit = (
    await stack.db('units').join('sites', 'sites.id', 'units.site_id').where('sites.name', 'Glasshouse Atrium').first('units.id')
  ).id;
  const rows = Array.from({ length: ROWS }, (_, i) => {
    const ts = T0 + i * 5000;
    return {
      unit_id: unitId,
      ts: new Date(ts),
      seq: i,
      tilt_plus_wm2: 500 + (i % 10),
      tilt_minus_wm2: 490,
      azimuth_plus_wm2: 480,
      azimuth_minus_wm2: 485,
      poa_wm2: ts === SPIKE_AT ? 1200 : 600,
      tilt_deg: 30,
      azimuth_deg: 180,
      cmd_tilt_deg: 31,
      cmd_azimuth_deg: 181,
      tilt_motor_a: 0.1,
      azimuth_motor_a: 0.2,
      dc_power_w: 300,
      module_temp_c: 30,
      mode: 'settled',
      received_at: new Date(ts),
    };
  });
  for (let i = 0; i < rows.length; i += 500) await stack.db('telemetry').insert(rows.slice(i, i + 500));
  // Rows written directly skip the ingest, so build their 1-minute rollup the way the rollup worker does.
  await new TelemetryRepository(stack.db).rollupMinuteRange([unitId], new Date(T0), new Date(T0 + ROWS * 5000));
  const siteId = (await stack.db('units').where({ id: unitId }).first('site_id')).site_id;
  const at = new Date(T0 + 1_200_000);
  await stack.db('alarms').insert({
    unit_id: unitId,
    site_id: siteId,
    kind: 'trap',
    severity: 'P3',
    state: 'active',
    message: 'Settled on a lesser peak',
    advice: 'Scan and relocate.',
    evidence: '{}',
    first_seen_at: at,
    raised_at: at,
    last_seen_at: at,
  });
  await stack.db('unit_events').insert([
    {
      unit_id: unitId,
      ts: new Date(T0 + 600_000),
      kind: 'mode-change',
      body: JSON.stringify({ v: 1, kind: 'mode-change', mode: 'scanning' }),
    },
    { unit_id: unitId, ts: new Date(T0 + 601_000), kind: 'scan-samples', body: JSON.stringify({ v: 1, samples: [[1, 2, 3]] }) },
  ]);
});
afterAll(async () => {
  await stack?.stop();
});

const agent = async (email: string) => {
  const a = request.agent(stack.http);
  await a.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  return a;
};
const range = (from: number, to: number) => `from=${new Date(from).toISOString()}&to=${new Date(to).toISOString()}`;

describe('downsampled traces', () => {
  it('gives min and max per bucket, keeps a one-sample spike, and overlays events (not scan samples)', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const res = await eng.get(`/api/units/${unitId}/traces?${range(T0, T0 + 7200_000)}&points=12`).expect(200);
    const body = res.body as UnitTraces;
    expect(body.bucketMs).toBe(600_000);
    expect(body.source).toBe('rollup');
    expect(body.t).toHaveLength(12);
    expect(body.t[0]).toBe(T0);
    expect(body.samples.every((n) => n === 120)).toBe(true);
    expect(body.rows).toBe(ROWS);
    const spikeBucket = Math.floor((SPIKE_AT - T0) / 600_000);
    expect(body.series.poaWm2.max[spikeBucket]).toBe(1200);
    expect(body.series.poaWm2.min[spikeBucket]).toBe(600);
    expect(body.series.poaWm2.max[0]).toBe(600);
    expect(body.series.tiltPlusWm2.min[0]).toBe(500);
    expect(body.series.tiltPlusWm2.max[0]).toBe(509);
    expect(body.series.tiltDiffWm2.min[0]).toBe(10);
    expect(body.series.tiltDiffWm2.max[0]).toBe(19);
    expect(body.series.azimuthDiffWm2.max[3]).toBe(-5);
    expect(body.series.cmdAzimuthDeg.min[7]).toBe(181);
    expect(body.events.map((e) => e.kind)).toEqual(['mode-change']);
    expect(body.events[0]!.text).toBe('Mode changed → Scanning');
    expect(body.alarms).toEqual([{ at: new Date(T0 + 1_200_000).toISOString(), kind: 'trap', text: 'Settled on a lesser peak (P3)' }]);
    expect(body.modelledBest.t.length).toBeGreaterThan(0);
    expect(body.modelledBest.wm2.every((w) => w > 100)).toBe(true);
  });

  it('never returns more buckets than asked, leaves empty buckets out, and refuses bad ranges', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const res = await eng.get(`/api/units/${unitId}/traces?${range(T0 - 86_400_000, T0 + 86_400_000)}&points=2000`).expect(200);
    expect(res.body.t.length).toBeLessThanOrEqual(2000);
    expect(res.body.t.length).toBeGreaterThan(50);
    expect(res.body.rows).toBe(ROWS);
    const empty = await eng.get(`/api/units/${unitId}/traces?${range(T0 - 7200_000, T0)}`).expect(200);
    expect(empty.body.t).toEqual([]);
    const backwards = await eng.get(`/api/units/${unitId}/traces?${range(T0, T0 - 1000)}`);
    expect(backwards.status).toBe(400);
    expect(backwards.body.error.fields.to).toBeTruthy();
    const tooLong = await eng.get(`/api/units/${unitId}/traces?${range(T0, T0 + 200 * 86_400_000)}`);
    expect(tooLong.status).toBe(400);
    const badPoints = await eng.get(`/api/units/${unitId}/traces?${range(T0, T0 + 1000)}&points=1`);
    expect(badPoints.body.error.fields.points).toBeTruthy();
  });

  it('reads raw reports for sub-minute buckets and agrees with the rollup on the same range', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const fine = (
      await eng.get(`/api/units/${unitId}/traces?${range(T0 + 3000_000 - 60_000, T0 + 3000_000 + 60_000)}&points=24`).expect(200)
    ).body as UnitTraces;
    expect(fine.source).toBe('raw');
    expect(fine.bucketMs).toBe(5000);
    expect(Math.max(...fine.series.poaWm2.max.map(Number))).toBe(1200);
    const coarse = (await eng.get(`/api/units/${unitId}/traces?${range(T0, T0 + 7200_000)}&points=10`).expect(200)).body as UnitTraces;
    expect(coarse.bucketMs).toBe(720_000);
    expect(coarse.series.poaWm2.max).toEqual([600, 600, 600, 600, 1200, 600, 600, 600, 600, 600]);
    expect(coarse.samples).toEqual(Array(10).fill(144));
  });

  it('is for staff: owners and crews may not read traces, owners see nothing of other owners', async () => {
    const crew = await agent('crew1@saltmarsh.example');
    expect((await crew.get(`/api/units/${unitId}/traces?${range(T0, T0 + 60_000)}`)).status).toBe(403);
    const owner = await agent('owner@quillmoor.example');
    expect((await owner.get(`/api/units/${unitId}/traces?${range(T0, T0 + 60_000)}`)).status).toBe(403);
    const tech = await agent('tech1@saltmarsh.example');
    expect((await tech.get(`/api/units/${otherOwnersUnit}/traces?${range(T0, T0 + 60_000)}`)).status).toBe(200);
  });
});

describe('CSV export', () => {
  it('streams RFC 4180 CSV with CRLF, ISO UTC first column and units in the column names', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const res = await eng
      .get(`/api/units/${unitId}/traces.csv?${range(T0, T0 + 3600_000)}`)
      .buffer(true)
      .parse((r, cb) => {
        let s = '';
        r.on('data', (c: Buffer) => (s += c.toString('utf8')));
        r.on('end', () => cb(null, s));
      })
      .expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/attachment; filename="QED-.*\.csv"/);
    const text = res.body as string;
    const lines = text.split('\r\n');
    expect(lines.at(-1)).toBe('');
    expect(text.replace(/\r\n/g, '')).not.toContain('\n');
    const header = lines[0]!.split(',');
    expect(header[0]).toBe('timestamp_utc');
    expect(header).toContain('poa_irradiance_W_m2');
    expect(header).toContain('tilt_differential_W_m2');
    expect(header).toContain('tracker_tilt_deg');
    expect(lines).toHaveLength(1 + 720 + 1);
    const first = lines[1]!.split(',');
    expect(first[0]).toBe('2026-06-10T08:00:00.000Z');
    expect(first[header.indexOf('poa_irradiance_W_m2')]).toBe('600');
    expect(first[header.indexOf('tilt_differential_W_m2')]).toBe('10');
    // A negative value is a number, not a formula: written as it is.
    expect(first[header.indexOf('azimuth_differential_W_m2')]).toBe('-5');
    expect(lines[720]!.startsWith('2026-06-10T08:59:55.000Z')).toBe(true);
  });

  it('refuses more than seven days and quotes fields per RFC 4180', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const res = await eng.get(`/api/units/${unitId}/traces.csv?${range(T0, T0 + 8 * 86_400_000)}`);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/7 days/);
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField(null)).toBe('');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvField(0)).toBe('0');
  });
});

describe('bucket merging', () => {
  it('merges the rollup part and the raw tail of one bucket', async () => {
    const { mergeBuckets } = await import('../../server/services/trace-service');
    const q = (lo: number, hi: number) =>
      Object.fromEntries(
        [
          'tiltPlusWm2',
          'tiltMinusWm2',
          'azimuthPlusWm2',
          'azimuthMinusWm2',
          'tiltDiffWm2',
          'azimuthDiffWm2',
          'tiltDeg',
          'cmdTiltDeg',
          'azimuthDeg',
          'cmdAzimuthDeg',
          'poaWm2',
          'dcPowerW',
        ].flatMap((k) => [
          [`${k}_lo`, lo],
          [`${k}_hi`, hi],
        ]),
      );
    const merged = mergeBuckets(
      [
        { b: 0, n: 12, ...q(1, 5) },
        { b: 1, n: 3, ...q(2, 3) },
      ],
      [
        { b: 1, n: 4, ...q(0, 9) },
        { b: 2, n: 1, ...q(7, 7) },
      ],
    );
    expect(merged.map((r) => [r.b, r.n, r['poaWm2_lo'], r['poaWm2_hi']])).toEqual([
      [0, 12, 1, 5],
      [1, 7, 0, 9],
      [2, 1, 7, 7],
    ]);
  });
});
