import { describe, expect, it } from 'vitest';
import type { z } from 'zod';
import { ackSchema, eventSchema, statusSchema, telemetrySchema, weatherSchema } from '../../shared/contracts/wire';
import {
  ackValidator,
  eventValidator,
  statusValidator,
  telemetryValidator,
  weatherValidator,
  type WireValidator,
} from '../../shared/contracts/wire-validators';

const TS = '2026-12-03T12:00:00.000Z';
const telemetry = {
  v: 1,
  seq: 41,
  ts: TS,
  tiltPlusWm2: 612,
  tiltMinusWm2: 600,
  azimuthPlusWm2: 605,
  azimuthMinusWm2: 603,
  poaWm2: 644,
  tiltDeg: 35.2,
  azimuthDeg: 171,
  cmdTiltDeg: 35,
  cmdAzimuthDeg: 171,
  tiltMotorA: 0.1,
  azimuthMotorA: 0.05,
  dcPowerW: 252,
  moduleTempC: 31,
  mode: 'settled',
  firmware: '2.4.1',
};
const event = {
  v: 1,
  ts: TS,
  kind: 'scan-samples',
  mode: 'scanning',
  code: 'c',
  message: 'm',
  commandId: 'cmd-1',
  samples: [
    [10, 180, 500],
    [20, 190, 600],
  ],
};
const weather = { v: 1, ts: TS, ghiWm2: 800, dhiWm2: 120, airTempC: 21, windMs: 4, gustMs: 9 };
const ack = { v: 1, commandId: 'cmd-1', ts: TS, result: 'done', reason: 'ok' };
const status = { v: 1, online: true, ts: TS, firmware: '2.4.1' };

/** Values that probe a field: its type's neighbours, the edges of the ranges in use and strings of awkward lengths. */
const PROBES: unknown[] = [
  null,
  true,
  0,
  1,
  2,
  -1,
  0.5,
  -50,
  -50.001,
  5000,
  5000.001,
  -5,
  95,
  95.5,
  -360,
  720,
  720.1,
  -100,
  200_000,
  200_001,
  -60,
  120,
  121,
  65,
  90,
  91,
  1600,
  1000,
  1001,
  2 ** 53 - 1,
  2 ** 53,
  1e308,
  '',
  '1',
  'settled',
  'bright',
  'x'.repeat(32),
  'x'.repeat(33),
  '😀'.repeat(32),
  '😀'.repeat(33),
  'x'.repeat(64),
  'x'.repeat(65),
  'x'.repeat(200),
  'x'.repeat(201),
  'x'.repeat(500),
  'x'.repeat(501),
  [],
  [1, 2, 3],
  {},
  // timestamps: precisions, offsets, calendars
  '2026-12-03T12:00Z',
  '2026-12-03T12:00:00Z',
  '2026-12-03T12:00:00.1Z',
  '2026-12-03T12:00:00.123456Z',
  '2026-12-03T12:00:00+01:00',
  '2026-12-03T12:00:00',
  '2026-12-03 12:00:00Z',
  '2026-12-03',
  '2024-02-29T00:00:00Z',
  '2026-02-29T00:00:00Z',
  '2000-02-29T00:00:00Z',
  '1900-02-29T00:00:00Z',
  '2026-13-01T00:00:00Z',
  '2026-04-31T00:00:00Z',
  '2026-12-03T24:00:00Z',
  '2026-12-03T23:59:60Z',
  '2026-12-03t12:00:00z',
  // enum members of the other schemas
  'seeking',
  'fault',
  'boot',
  'accepted',
  'rejected',
  'later',
];

/** The valid payload, then every field probed with every value, removed, and the payload with extra or odd keys. */
function corpus(valid: Record<string, unknown>): unknown[] {
  const out: unknown[] = [valid, null, [], 1, 'x', true, {}];
  for (const key of Object.keys(valid)) {
    for (const probe of PROBES) out.push({ ...valid, [key]: probe });
    const { [key]: _gone, ...rest } = valid;
    out.push(rest);
  }
  out.push({ ...valid, extra: true }, JSON.parse(`{"__proto__": {"x": 1}, "v": 1}`), JSON.parse(JSON.stringify({ ...valid, v: 1.0 })));
  return out;
}

const cases: [string, z.ZodType, WireValidator<unknown>, Record<string, unknown>][] = [
  ['telemetry', telemetrySchema, telemetryValidator, telemetry],
  ['events', eventSchema, eventValidator, event],
  ['weather', weatherSchema, weatherValidator, weather],
  ['acks', ackSchema, ackValidator, ack],
  ['status', statusSchema, statusValidator, status],
];

describe('compiled wire validators', () => {
  it.each(cases)(
    '%s: accept and refuse exactly what the zod schema does (field probes, missing and extra fields)',
    (_, schema, validator, valid) => {
      const payloads = corpus(valid);
      let accepted = 0;
      for (const p of payloads) {
        const want = schema.safeParse(p).success;
        expect({ payload: p, accepted: validator.safeParse(p).success }).toEqual({ payload: p, accepted: want });
        if (want) accepted++;
      }
      // The corpus holds both answers in numbers, or the comparison would prove little.
      expect(accepted).toBeGreaterThan(10);
      expect(payloads.length - accepted).toBeGreaterThan(100);
    },
  );

  it('scan samples: tuples of three numbers within their ranges, at most 250 of them', () => {
    const probes = [
      [[1, 2]],
      [[1, 2, 3, 4]],
      [['1', 2, 3]],
      [[96, 0, 0]],
      [[0, 721, 0]],
      [[0, 0, 5001]],
      Array(250).fill([1, 2, 3]),
      Array(251).fill([1, 2, 3]),
    ];
    for (const samples of probes) {
      const p = { ...event, samples };
      expect(eventValidator.safeParse(p).success).toBe(eventSchema.safeParse(p).success);
    }
    expect(eventValidator.safeParse({ ...event, samples: Array(251).fill([1, 2, 3]) }).success).toBe(false);
  });

  it('names the field and what is wrong with it', () => {
    const issue = (p: unknown) => {
      const r = telemetryValidator.safeParse(p);
      return r.success ? null : r.error.issues[0];
    };
    expect(issue({ ...telemetry, poaWm2: 5001 })).toEqual({ path: ['poaWm2'], message: 'Must be <= 5000.' });
    expect(issue({ ...telemetry, poaWm2: 'bright' })).toEqual({ path: ['poaWm2'], message: 'Must be number.' });
    expect(issue({ ...telemetry, extra: true })).toEqual({ path: ['extra'], message: 'Unknown field.' });
    const { ts: _ts, ...noTs } = telemetry;
    expect(issue(noTs)).toEqual({ path: ['ts'], message: 'Required.' });
    expect(issue({ ...telemetry, ts: '2026-12-03T12:00:00+01:00' })).toEqual({
      path: ['ts'],
      message: 'Must be an ISO 8601 UTC timestamp ending in Z.',
    });
    expect(issue({ ...telemetry, mode: 'dancing' })).toEqual({
      path: ['mode'],
      message: 'Must be one of seeking, settled, scanning, stowed, held, fault.',
    });
    expect(issue({ ...telemetry, v: 2 })).toEqual({ path: ['v'], message: 'Must be 1.' });
    expect(issue(null)).toEqual({ path: [], message: 'Must be object.' });
    const e = eventValidator.safeParse({
      ...event,
      samples: [
        [10, 180, 500],
        [10, 800, 500],
      ],
    });
    expect(e.success ? null : e.error.issues[0]).toEqual({ path: ['samples', 1, 1], message: 'Must be <= 720.' });
  });

  it('a valid payload is passed through as it is (no copy)', () => {
    const p = { ...telemetry };
    const r = telemetryValidator.safeParse(p);
    expect(r.success && r.data).toBe(p);
  });
});
