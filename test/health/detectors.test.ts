import { describe, expect, it } from 'vitest';
import { T0, UNIT, feed, modelOf, peer, report, sunLandscape, testEngine } from './synthetic';
import { rawWordsIn } from '../helpers/raw-words';
import { PeerLevels, TrapDetector } from '../../server/health/trap-detector';
import { quantile } from '../../server/health/unit-sample';
import { DEFAULT_HEALTH_SETTINGS } from '../../server/health/health-settings';
import type { SiteModel } from '../../server/health/site-model';

/** The text people read of an alarm: its message and its advice. */
const words = (a: { message: string; advice: string }) => `${a.message} ${a.advice}`;

// Sun at azimuth 180°, elevation 50°: the global maximum is the panel facing it, tilt 40°, azimuth 180°.
const irr = sunLandscape(180, 50);
const model = (at: number) => modelOf(irr, at);
const MIN = 60_000;
const onTrapHere = { tiltDeg: 70, azimuthDeg: 80 };

describe('trap detector', () => {
  // A second bright spot (a facade reflection) at tilt 60°, azimuth 80°: a local maximum well below the sun's.
  const cluttered = (n: readonly number[]) => irr(n) + 0 * n[0]!;
  const onTrap = { tiltDeg: 70, azimuthDeg: 80 }; // far from the sun: E ≈ 100 + 800·cos(angle) well below the peak

  it('raises after the delay-on for a settled unit well below the model and its peers, with where, loss and advice', () => {
    const e = testEngine(model);
    const best = model(T0).globalMax;
    feed(e, T0, 30, [
      { unit: UNIT, make: (at) => report(cluttered, at, onTrap) },
      ...[1, 2, 3].map((i) => ({ unit: peer(i), make: (at: number) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 }) })),
    ]);
    const traps = e.raised.filter((a) => a.kind === 'trap');
    expect(traps).toHaveLength(1);
    const a = traps[0]!;
    expect(a.serial).toBe(UNIT.serial);
    expect(a.raisedMs - a.firstSeenMs).toBe(10 * MIN); // delay-on
    expect(a.message).toContain(`tilt ${best.tiltDeg}°, azimuth ${best.azimuthDeg}°`);
    expect(a.message).toMatch(/losing \d+(\.\d)? W\/m² \(\d+(\.\d)? %\)/);
    expect(a.advice).toMatch(/scan/);
    expect(a.advice).toMatch(/detector tilt/);
    expect((a.evidence as { lossWm2: number }).lossWm2).toBeGreaterThan(0.16 * best.wm2);
    expect(a.severity).toBe('P3');
    expect(rawWordsIn(words(a))).toEqual([]);
  });

  it('stays quiet for a unit on the peak, at night, on hold, or seeking', () => {
    for (const [name, m, make] of [
      ['on the peak', model, (at: number) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 })],
      ['night', (at: number) => modelOf(irr, at, { sunElevationDeg: -5 }), (at: number) => report(irr, at, onTrap)],
      ['held', model, (at: number) => report(irr, at, { ...onTrap, mode: 'held' })],
      ['seeking', model, (at: number) => report(irr, at, { ...onTrap, mode: 'seeking' })],
    ] as const) {
      const e = testEngine(m);
      feed(e, T0, 30, [{ unit: UNIT, make }]);
      expect(
        e.raised.filter((a) => a.kind === 'trap'),
        name,
      ).toHaveLength(0);
    }
  });

  it('does not raise when the model is not confirmed here and the peers are just as low (model error, not a trap)', () => {
    // The model says 2× what the site measures everywhere.
    const doubled = (n: readonly number[]) => 2 * irr(n);
    const e = testEngine((at) => modelOf(doubled, at));
    feed(e, T0, 30, [
      { unit: UNIT, make: (at) => report(irr, at, onTrap) },
      ...[1, 2].map((i) => ({ unit: peer(i), make: (at: number) => report(irr, at, onTrap) })),
    ]);
    expect(e.raised.filter((a) => a.kind === 'trap')).toHaveLength(0);
  });

  it('without peers to compare with, raises only where the model is confirmed at the unit (a small site, a model too bright)', () => {
    // One unit at its site: the model says 1.4× what it measures everywhere, the unit on the true peak.
    const bright = (n: readonly number[]) => 1.4 * irr(n);
    const e = testEngine((at) => modelOf(bright, at));
    feed(e, T0, 30, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 }) }]);
    expect(e.raised.filter((a) => a.kind === 'trap')).toHaveLength(0);
    // The same lone unit on the trap with the model right: trapped.
    const ok = testEngine(model);
    feed(ok, T0, 30, [{ unit: UNIT, make: (at) => report(irr, at, onTrap) }]);
    expect(ok.raised.filter((a) => a.kind === 'trap')).toHaveLength(1);
  });

  it('takes the peers’ light as the best when the model is dimmer than what they measure (a facade brighter than surveyed)', () => {
    // The model says half of what the site gets; the unit sits at about 0.73 of the best while three peers face the sun.
    const dim = (n: readonly number[]) => 0.5 * irr(n);
    const e = testEngine((at) => modelOf(dim, at));
    feed(e, T0, 30, [
      { unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 110 }) },
      ...[1, 2, 3].map((i) => ({ unit: peer(i), make: (at: number) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 }) })),
    ]);
    expect(e.raised.filter((a) => a.kind === 'trap').map((a) => a.serial)).toEqual([UNIT.serial]);
  });

  it('does not raise for a unit balanced on a drifting detector (its pair disagrees with the model here)', () => {
    // One tilt detector reads 12 % low: the pair's ratio departs from the modelled ratio by more than the tolerance.
    const e = testEngine(model);
    feed(e, T0, 30, [{ unit: UNIT, make: (at) => report(irr, at, { ...onTrap, gains: [0.88, 1, 1, 1] }) }]);
    expect(e.raised.filter((a) => a.kind === 'trap')).toHaveLength(0);
    // The same unit with a pair within the tolerance (3 % low) is trapped.
    const ok = testEngine(model);
    feed(ok, T0, 30, [{ unit: UNIT, make: (at) => report(irr, at, { ...onTrap, gains: [0.97, 1, 1, 1] }) }]);
    expect(ok.raised.filter((a) => a.kind === 'trap')).toHaveLength(1);
  });

  it('does not judge traps while the best orientation is dim (below the trap gate), though it is daylight', () => {
    // Same geometry at a tenth of the light: best ≈ 140 W/m², above the daylight gate (100) but below the trap gate (150).
    const dim = sunLandscape(180, 50, 80, 10);
    const e = testEngine((at) => modelOf(dim, at));
    feed(e, T0, 30, [{ unit: UNIT, make: (at) => report(dim, at, onTrap) }]);
    expect(e.raised.filter((a) => a.kind === 'trap')).toHaveLength(0);
    const bright = sunLandscape(180, 50, 160, 20);
    const b = testEngine((at) => modelOf(bright, at));
    feed(b, T0, 30, [{ unit: UNIT, make: (at) => report(bright, at, onTrap) }]);
    expect(b.raised.filter((a) => a.kind === 'trap')).toHaveLength(1);
  });

  it('clears automatically once the unit gets back above the clear ratio (after the clear delay)', () => {
    const e = testEngine(model);
    const end = feed(e, T0, 20, [{ unit: UNIT, make: (at) => report(irr, at, onTrap) }]);
    expect(e.raised).toHaveLength(1);
    feed(e, end, 10, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 }) }]);
    expect(e.cleared.map((a) => a.kind)).toEqual(['trap']);
    expect(e.cleared[0]!.clearedMs! - end).toBe(3 * MIN);
  });
});

describe('trap detector: what it asks the model', () => {
  const settings = DEFAULT_HEALTH_SETTINGS;
  const counted = (at: number) => {
    const m = modelOf(irr, at);
    const calls = { n: 0 };
    const readings = m.readings;
    return { calls, model: { ...m, readings: (t: number, a: number, d: number) => (calls.n++, readings(t, a, d)) } };
  };
  const ctx = (m: SiteModel, open: boolean) => ({
    model: m,
    daylight: true,
    peerLevels: PeerLevels.none,
    otherCause: null,
    open,
    trappedAtSite: 0,
  });
  // The model's readings cost a harmonic evaluation per detector; most units, most of the day, are not trapped.
  it('a healthy unit at its peak (ratio ≥ trap ratio, no trap open) is judged false without asking for modelled readings', () => {
    const { calls, model: m } = counted(T0);
    const r = new TrapDetector().assess(UNIT, report(irr, T0, { tiltDeg: 40, azimuthDeg: 180 }), T0, ctx(m, false), settings);
    expect(r.condition).toBe(false);
    expect(calls.n).toBe(0);
  });
  it('with a trap open, between the trap and the clear ratio the answer is unknown (hysteresis) without asking; above it, it asks', () => {
    const best = modelOf(irr, T0).globalMax.wm2;
    // The same landscape scaled so the unit at the peak reads 0.86 of the model's best (between 0.85 and 0.88).
    const { calls, model: m } = counted(T0);
    const between = { ...report(irr, T0, { tiltDeg: 40, azimuthDeg: 180 }), poaWm2: 0.86 * best };
    expect(new TrapDetector().assess(UNIT, between, T0, ctx(m, true), settings).condition).toBe(null);
    expect(calls.n).toBe(0);
    const above = report(irr, T0, { tiltDeg: 40, azimuthDeg: 180 });
    expect(new TrapDetector().assess(UNIT, above, T0, ctx(m, true), settings).condition).toBe(false);
    expect(calls.n).toBe(1);
  });
  it('a unit below the trap ratio is checked against the modelled readings (and is trapped here)', () => {
    const { calls, model: m } = counted(T0);
    const r = new TrapDetector().assess(UNIT, report(irr, T0, onTrapHere), T0, ctx(m, false), settings);
    expect(calls.n).toBe(1);
    expect(r.condition).toBe(true);
  });
});

describe('stall detector', () => {
  it('raises for an axis commanded away that does not move and draws stall current', () => {
    const e = testEngine(model);
    feed(e, T0, 5, [
      { unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 30, azimuthDeg: 180, cmdTiltDeg: 40, tiltMotorA: 3.8, mode: 'seeking' }) },
    ]);
    const s = e.raised.filter((a) => a.kind === 'stall');
    expect(s).toHaveLength(1);
    expect(s[0]!.message).toMatch(/tilt axis/);
    expect(s[0]!.severity).toBe('P2');
    expect(rawWordsIn(words(s[0]!))).toEqual([]);
  });

  it('stays quiet for a drive that moves at normal current, and clears once the stalled axis moves again', () => {
    const e = testEngine(model);
    feed(e, T0, 10, [
      {
        unit: UNIT,
        make: (at, i) =>
          report(irr, at, { tiltDeg: 20 + i * 0.2, azimuthDeg: 180, cmdTiltDeg: 21 + i * 0.2, tiltMotorA: 1.3, mode: 'seeking' }),
      },
    ]);
    expect(e.raised).toHaveLength(0);
    const end = feed(e, T0 + 10 * MIN, 3, [
      { unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 30, azimuthDeg: 180, cmdTiltDeg: 40, tiltMotorA: 3.8, mode: 'seeking' }) },
    ]);
    expect(e.raised.map((a) => a.kind)).toEqual(['stall']);
    feed(e, end, 5, [
      {
        unit: UNIT,
        make: (at, i) => report(irr, at, { tiltDeg: 30 + i, azimuthDeg: 180, cmdTiltDeg: 31 + i, tiltMotorA: 1.2, mode: 'seeking' }),
      },
    ]);
    expect(e.cleared.map((a) => a.kind)).toEqual(['stall']);
  });
});

describe('drift detector', () => {
  it('names the detector that reads low against the model where the unit points, and calls a dead one dead', () => {
    for (const [gains, finding] of [
      [[1, 0.85, 1, 1], 'drifting'],
      [[1, 1, 0.001, 1], 'dead'],
    ] as const) {
      const e = testEngine(model);
      feed(e, T0, 30, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180, gains: [...gains] }) }]);
      const d = e.raised.filter((a) => a.kind === 'drift');
      expect(d).toHaveLength(1);
      expect((d[0]!.evidence as { detector: string; finding: string }).detector).toBe(finding === 'dead' ? 'azimuthPlus' : 'tiltMinus');
      expect((d[0]!.evidence as { finding: string }).finding).toBe(finding);
      // The evidence keeps the key; the text names the detector as the trace explorer does.
      expect(d[0]!.message).toMatch(finding === 'dead' ? /^The azimuth detector \+ reads / : /^The tilt detector − reads /);
      expect(rawWordsIn(words(d[0]!))).toEqual([]);
    }
  });

  it('finds a dead detector in dim light too (the shade of a tower: every orientation under 100 W/m²)', () => {
    // Best orientation about 110 W/m², the unit flat on about 94 W/m².
    const dim = sunLandscape(180, 50, 70, 40);
    const e = testEngine((at) => modelOf(dim, at));
    feed(e, T0, 40, [{ unit: UNIT, make: (at) => report(dim, at, { tiltDeg: 0, azimuthDeg: 180, gains: [0.001, 1, 1, 1] }) }]);
    const d = e.raised.filter((a) => a.kind === 'drift');
    expect(d).toHaveLength(1);
    expect(d[0]!.evidence).toMatchObject({ detector: 'tiltPlus', finding: 'dead' });
  });

  it('takes a pair skewed both ways (one high, its partner as low: the model’s slope off where the unit points) for model error, not drift', () => {
    const e = testEngine(model);
    feed(e, T0, 60, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 35, azimuthDeg: 170, gains: [1.15, 0.86, 1, 1] }) }]);
    expect(e.raised).toHaveLength(0);
    // One detector of the pair off by as much, its partner right: drift.
    const one = testEngine(model);
    feed(one, T0, 60, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 35, azimuthDeg: 170, gains: [1.15, 1, 1, 1] }) }]);
    expect(one.raised.filter((a) => a.kind === 'drift').map((a) => (a.evidence as { detector: string }).detector)).toEqual(['tiltPlus']);
  });

  it('accepts the usual calibration spread (±2 %) and stays quiet', () => {
    const e = testEngine(model);
    feed(e, T0, 60, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 35, azimuthDeg: 170, gains: [1.02, 0.98, 1.01, 0.99] }) }]);
    expect(e.raised).toHaveLength(0);
  });
});

describe('hunting detector', () => {
  it('raises for a unit swinging back and forth without getting anywhere', () => {
    const e = testEngine(model);
    feed(e, T0, 20, [
      { unit: UNIT, make: (at, i) => report(irr, at, { tiltDeg: 40 + (i % 2 ? 4 : -4), azimuthDeg: 180, mode: 'seeking' }) },
    ]);
    const h = e.raised.filter((a) => a.kind === 'hunting');
    expect(h).toHaveLength(1);
    expect(h[0]!.message).toMatch(/reversals per hour/);
    expect(rawWordsIn(words(h[0]!))).toEqual([]);
  });

  it('is not raised on top of a drifting detector, which explains the back-and-forth', () => {
    const e = testEngine(model);
    // First the pair goes wrong (tilt − detector reads 20 % low) while the unit sits still: a drift alarm opens.
    const end = feed(e, T0, 40, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 35, azimuthDeg: 170, gains: [1, 0.8, 1, 1] }) }]);
    expect(e.raised.map((a) => a.kind)).toContain('drift');
    // Then it swings back and forth chasing the false differential: no hunting alarm while the drift alarm is open.
    feed(e, end, 20, [
      {
        unit: UNIT,
        make: (at, i) => report(irr, at, { tiltDeg: 40 + (i % 2 ? 4 : -4), azimuthDeg: 180, mode: 'seeking', gains: [1, 0.8, 1, 1] }),
      },
    ]);
    expect(e.raised.filter((a) => a.kind === 'hunting')).toHaveLength(0);
  });

  it('stays quiet for a unit following the sun slowly, and for a scan sweeping back and forth', () => {
    const e = testEngine(model);
    feed(e, T0, 30, [
      { unit: UNIT, make: (at, i) => report(irr, at, { tiltDeg: 40 + i * 0.02, azimuthDeg: 180 + i * 0.02, mode: 'settled' }) },
      {
        unit: peer(1),
        make: (at, i) => report(irr, at, { tiltDeg: 40, azimuthDeg: i % 24 < 12 ? (i % 12) * 30 : 360 - (i % 12) * 30, mode: 'scanning' }),
      },
    ]);
    expect(e.raised).toHaveLength(0);
  });
});

describe('soiling detector', () => {
  it("raises when power per in-plane irradiance falls 5 % below the unit's own clean history, and not before", () => {
    const e = testEngine(model);
    let end = feed(e, T0, 4 * 60, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 }) }]);
    expect(e.raised).toHaveLength(0);
    end = feed(e, end, 3 * 60, [
      {
        unit: UNIT,
        make: (at) => {
          const t = report(irr, at, { tiltDeg: 40, azimuthDeg: 180 });
          return { ...t, dcPowerW: t.dcPowerW * 0.93 };
        },
      },
    ]);
    const s = e.raised.filter((a) => a.kind === 'soiling');
    expect(s).toHaveLength(1);
    expect((s[0]!.evidence as { lossPct: number }).lossPct).toBeCloseTo(7, 0);
    // DC power per 1000 W/m² of in-plane irradiance, in words (not "W per kW/m²").
    expect(s[0]!.message).toMatch(
      /^DC power for the light it gets is 7(\.\d)? % below this unit's clean reference: .* W for every 1000 W\/m² in the plane of its modules, against .* W when clean\.$/,
    );
    expect(rawWordsIn(words(s[0]!))).toEqual([]);
    feed(e, end, 3 * 60, [{ unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180 }) }]);
    expect(e.cleared.map((a) => a.kind)).toEqual(['soiling']); // cleaned
  });
});

describe('comms detector and stow watch', () => {
  it('raises comms loss after the silence and the delay-on, and clears on the next report', () => {
    const e = testEngine(model);
    let at = feed(e, T0, 5, [{ unit: UNIT, make: (t) => report(irr, t, { tiltDeg: 40, azimuthDeg: 180 }) }]);
    for (; at < T0 + 15 * MIN; at += 5000) {
      e.setNow(at);
      e.engine.tick();
    }
    const c = e.raised.filter((a) => a.kind === 'comms');
    expect(c).toHaveLength(1);
    expect(c[0]!.raisedMs - (T0 + 5 * MIN)).toBeLessThanOrEqual(5 * MIN + 20_000);
    feed(e, at, 1, [{ unit: UNIT, make: (t) => report(irr, t, { tiltDeg: 40, azimuthDeg: 180 }) }]);
    expect(e.cleared.map((a) => a.kind)).toEqual(['comms']);
  });

  it('a unit still up at tilt 40° three minutes into gusts above the stow limit is critical; a stowed one is not', () => {
    const e = testEngine(model);
    e.engine.weather(1, { v: 1, ts: new Date(T0).toISOString(), ghiWm2: 700, airTempC: 20, windMs: 14, gustMs: 22 });
    feed(e, T0, 5, [
      { unit: UNIT, make: (at) => report(irr, at, { tiltDeg: 40, azimuthDeg: 180, mode: 'fault' }) },
      { unit: peer(1), make: (at) => report(irr, at, { tiltDeg: 0, azimuthDeg: 180, mode: 'stowed' }) },
    ]);
    const n = e.raised.filter((a) => a.kind === 'not-stowed');
    expect(n.map((a) => a.serial)).toEqual([UNIT.serial]);
    expect(n[0]!.severity).toBe('P1');
    expect(n[0]!.message).toMatch(/tilt 40°, reporting a fault\.$/);
    expect(rawWordsIn(words(n[0]!))).toEqual([]);
    expect(n[0]!.raisedMs - T0).toBe(3 * MIN);
  });
});

describe('drift detector: what it asks the model', () => {
  it('works out the modelled readings once per model and orientation: a settled unit sampled again costs no harmonic evaluation', async () => {
    const { DriftDetector } = await import('../../server/health/drift-detector');
    let calls = 0;
    const base = modelOf(irr, T0);
    const counted = { ...base, readings: (t: number, a: number, d: number) => (calls++, base.readings(t, a, d)) };
    const d = new DriftDetector();
    const at = (k: number) => T0 + k * 15_000;
    const here = { tiltDeg: 40, azimuthDeg: 180 };
    d.assess(UNIT, report(irr, at(0), here), at(0), counted, true, false, DEFAULT_HEALTH_SETTINGS);
    expect(calls).toBe(5); // here and the four orientations around it
    d.assess(UNIT, report(irr, at(1), here), at(1), counted, true, false, DEFAULT_HEALTH_SETTINGS);
    expect(calls).toBe(5);
    // It moved: worked out again.
    d.assess(UNIT, report(irr, at(2), { tiltDeg: 41, azimuthDeg: 180 }), at(2), counted, true, false, DEFAULT_HEALTH_SETTINGS);
    expect(calls).toBe(10);
    // A new model (the site's was rebuilt): again.
    const rebuilt = { ...counted };
    d.assess(UNIT, report(irr, at(3), { tiltDeg: 41, azimuthDeg: 180 }), at(3), rebuilt, true, false, DEFAULT_HEALTH_SETTINGS);
    expect(calls).toBe(15);
  });
});

describe('hunting window', () => {
  it('counts reversals of motion of at least the step, path and net motion (tilt and sin(tilt)-weighted azimuth)', async () => {
    const { motionStats } = await import('../../server/health/hunting-detector');
    // Tilt 30 → 33 → 30 → 33 → 30 at one minute apart: 3 reversals of 3° steps in 4 min = 45 per hour, path 12°, net 0.
    const zigzag = [30, 33, 30, 33, 30].map((tiltDeg, i) => ({ atMs: T0 + i * MIN, tiltDeg, azimuthDeg: 180 }));
    expect(motionStats(zigzag, 2)).toEqual({ reversalsPerHour: 45, pathDeg: 12, netDeg: 0, spanMin: 4 });
    // Azimuth 180 → 190 at tilt 30°: weighted by sin 30° = 0.5, so 5° of path; below a 6° step there is no reversal.
    const az = [180, 190, 180].map((azimuthDeg, i) => ({ atMs: T0 + i * MIN, tiltDeg: 30, azimuthDeg }));
    const st = motionStats(az, 6);
    expect(st.reversalsPerHour).toBe(0);
    expect(st.pathDeg).toBeCloseTo(10, 12);
  });
  it('a window that slid and grew gives the same statistics as one built from the samples it still holds', async () => {
    const { SampleWindow, motionStats } = await import('../../server/health/hunting-detector');
    const w = new SampleWindow();
    const kept: { atMs: number; tiltDeg: number; azimuthDeg: number }[] = [];
    for (let i = 0; i < 300; i++) {
      const s = { atMs: T0 + i * 5000, tiltDeg: 30 + 4 * Math.sin(i / 3), azimuthDeg: (350 + 7 * i) % 360 };
      w.push(s.atMs, s.tiltDeg, s.azimuthDeg, 500 + i);
      kept.push(s);
      w.dropOlder(s.atMs, 10 * MIN);
      while (s.atMs - kept[0]!.atMs > 10 * MIN) kept.shift();
      if (i % 37 === 0) expect(w.motionStats(2)).toEqual(motionStats(kept, 2));
    }
    expect(w.length).toBe(kept.length);
    expect(w.poaValues()).toEqual(kept.map((_, k) => 500 + 300 - kept.length + k));
  });
});

describe('hunting under changing light', () => {
  it('measures light variation as standard deviation over mean', async () => {
    const { lightVariation } = await import('../../server/health/hunting-detector');
    expect(lightVariation([500, 500])).toBe(0);
    expect(lightVariation([300, 700])).toBeCloseTo(0.4, 10);
  });
});

describe('peer levels of a site', () => {
  // The quantile each report needs is read from one sorted copy per site snapshot; it must equal sorting the peers
  // other than the unit itself (what a report did before, at O(n log n) each).
  const reading = (unitId: number, poaWm2: number, mode = 'settled', atMs = T0) => ({ unitId, poaWm2, mode, atMs });

  it('equals the quantile of the other comparable peers, whoever asks', () => {
    let x = 12345;
    const rand = () => (x = (x * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    const peers = Array.from({ length: 40 }, (_, i) =>
      reading(i + 1, Math.round(rand() * 1000), rand() < 0.2 ? 'stowed' : 'settled', T0 - Math.round(rand() * 200_000)),
    );
    // Two units on the same value: leaving one out must leave the other in.
    peers.push(reading(41, peers[0]!.poaWm2), reading(42, peers[0]!.poaWm2));
    const levels = PeerLevels.of(peers, T0);
    for (const asking of [1, 7, 41, 42, 99]) {
      const others = peers.filter((p) => p.unitId !== asking && T0 - p.atMs <= 120_000 && p.mode === 'settled').map((p) => p.poaWm2);
      for (const q of [0.5, 0.75, 1]) {
        const got = levels.without(asking, q);
        expect(got.count).toBe(others.length);
        expect(got.quantileWm2).toBeCloseTo(quantile(others, q), 9);
      }
    }
  });

  it('has no quantile with fewer than two other peers', () => {
    const levels = PeerLevels.of([reading(1, 500), reading(2, 600)], T0);
    expect(levels.without(1, 0.75)).toEqual({ count: 1, quantileWm2: null });
    expect(levels.without(3, 0.75)).toEqual({ count: 2, quantileWm2: 575 });
    expect(PeerLevels.none.without(1, 0.75)).toEqual({ count: 0, quantileWm2: null });
  });
});
