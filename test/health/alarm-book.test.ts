import { describe, expect, it } from 'vitest';
import { AlarmBook } from '../../server/health/alarm-book';
import type { Alarm } from '../../server/health/alarm-types';
import { T0, UNIT, feed, modelOf, peer, report, sunLandscape, testEngine } from './synthetic';

const MIN = 60_000;
const unit = { unitId: 7, serial: 'U-7', siteId: 1 };
const timing = { delayOnMs: 10 * MIN, clearDelayMs: 3 * MIN };
const detail = () => ({ severity: 'P3' as const, message: 'm', advice: 'a', evidence: { x: 1 } });

function book() {
  const raised: Alarm[] = [];
  const cleared: Alarm[] = [];
  return { b: new AlarmBook({ raised: (a) => raised.push(a), cleared: (a) => cleared.push(a) }), raised, cleared };
}

describe('alarm book', () => {
  it('delay-on: a condition shorter than the delay raises nothing; a sustained one raises once, first seen at its start', () => {
    const { b, raised } = book();
    for (let t = 0; t < 9 * MIN; t += MIN) b.assess(unit, 'trap', true, T0 + t, timing, detail);
    b.assess(unit, 'trap', false, T0 + 9 * MIN, timing, detail);
    expect(raised).toHaveLength(0);
    for (let t = 10 * MIN; t <= 30 * MIN; t += MIN) b.assess(unit, 'trap', true, T0 + t, timing, detail);
    expect(raised).toHaveLength(1);
    expect(raised[0]!.firstSeenMs).toBe(T0 + 10 * MIN);
    expect(raised[0]!.raisedMs).toBe(T0 + 20 * MIN);
    expect(raised[0]!.lastSeenMs).toBe(T0 + 30 * MIN);
  });

  it('dedupe: one open alarm per unit and kind; other kinds and units are separate', () => {
    const { b, raised } = book();
    for (let t = 0; t <= 60 * MIN; t += MIN) {
      b.assess(unit, 'trap', true, T0 + t, timing, detail);
      b.assess(unit, 'drift', true, T0 + t, timing, detail);
      b.assess({ ...unit, unitId: 8, serial: 'U-8' }, 'trap', true, T0 + t, timing, detail);
    }
    expect(raised.map((a) => `${a.serial}/${a.kind}`).sort()).toEqual(['U-7/drift', 'U-7/trap', 'U-8/trap']);
    expect(b.open()).toHaveLength(3);
  });

  it('hysteresis: an absence shorter than the clear delay keeps the alarm open; a longer one clears it automatically', () => {
    const { b, raised, cleared } = book();
    for (let t = 0; t <= 12 * MIN; t += MIN) b.assess(unit, 'trap', true, T0 + t, timing, detail);
    b.assess(unit, 'trap', false, T0 + 13 * MIN, timing, detail);
    b.assess(unit, 'trap', false, T0 + 15 * MIN, timing, detail); // 2 min absent < 3 min
    b.assess(unit, 'trap', true, T0 + 16 * MIN, timing, detail);
    expect(cleared).toHaveLength(0);
    expect(raised).toHaveLength(1);
    for (let t = 17 * MIN; t <= 21 * MIN; t += MIN) b.assess(unit, 'trap', false, T0 + t, timing, detail);
    expect(cleared).toHaveLength(1);
    expect(cleared[0]!.clearedMs).toBe(T0 + 20 * MIN);
    expect(cleared[0]!.state).toBe('cleared');
    expect(cleared[0]!.clearReason).toBe('condition ended');
    // A new episode is a new alarm.
    for (let t = 30 * MIN; t <= 45 * MIN; t += MIN) b.assess(unit, 'trap', true, T0 + t, timing, detail);
    expect(raised).toHaveLength(2);
  });

  it('unknown (null) neither raises, clears nor resets the delay', () => {
    const { b, raised } = book();
    b.assess(unit, 'trap', true, T0, timing, detail);
    b.assess(unit, 'trap', null, T0 + 5 * MIN, timing, detail);
    b.assess(unit, 'trap', true, T0 + 10 * MIN, timing, detail);
    expect(raised).toHaveLength(1);
    expect(raised[0]!.firstSeenMs).toBe(T0);
  });

  it('suppression blocks the raise but keeps the delay running', () => {
    const { b, raised } = book();
    for (let t = 0; t <= 20 * MIN; t += MIN) b.assess(unit, 'comms', true, T0 + t, timing, detail, true);
    expect(raised).toHaveLength(0);
    b.assess(unit, 'comms', true, T0 + 21 * MIN, timing, detail, false);
    expect(raised).toHaveLength(1);
    expect(raised[0]!.firstSeenMs).toBe(T0);
  });
});

describe('site-level suppression', () => {
  const irr = sunLandscape(180, 50);
  const model = (at: number) => modelOf(irr, at);
  const units = [UNIT, peer(1), peer(2), peer(3)];

  it('a whole site going silent raises one site alarm and no unit comms alarms; it clears when the site reports again', () => {
    const e = testEngine(model);
    let at = feed(
      e,
      T0,
      5,
      units.map((u) => ({ unit: u, make: (t: number) => report(irr, t, { tiltDeg: 40, azimuthDeg: 180 }) })),
    );
    for (; at < T0 + 30 * MIN; at += 5000) {
      e.setNow(at);
      e.engine.tick();
    }
    expect(e.raised.map((a) => a.kind)).toEqual(['site-comms']);
    expect(e.raised[0]!.unitId).toBeNull();
    expect(e.raised[0]!.message).toMatch(/4 of 4 units silent/);
    feed(
      e,
      at,
      1,
      units.map((u) => ({ unit: u, make: (t: number) => report(irr, t, { tiltDeg: 40, azimuthDeg: 180 }) })),
    );
    expect(e.cleared.map((a) => a.kind)).toEqual(['site-comms']);
    expect(e.raised.filter((a) => a.kind === 'comms')).toHaveLength(0);
  });

  it('one silent unit among reporting peers gets its own comms alarm', () => {
    const e = testEngine(model);
    feed(
      e,
      T0,
      20,
      units.map((u) => ({
        unit: u,
        make: (t: number, i: number) => (u === UNIT && i > 12 ? null : report(irr, t, { tiltDeg: 40, azimuthDeg: 180 })),
      })),
    );
    expect(e.raised.map((a) => `${a.kind}/${a.serial}`)).toEqual([`comms/${UNIT.serial}`]);
  });
});
