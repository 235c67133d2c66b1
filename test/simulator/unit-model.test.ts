import { describe, expect, it } from 'vitest';
import { ackSchema, eventSchema, telemetrySchema, weatherSchema } from '../../shared/contracts/wire';
import { createFleet } from '../../simulator/fleet';
import { createRng } from '../../simulator/rng';
import { demoSiteInfo, demoFleetSites } from '../../simulator/demo-fleet';
import { parseFaultPlan } from '../../simulator/faults';
import { createScenarioWorld, frozenWorld, UnknownNameError } from '../../simulator/scenarios';
import { parseOptions } from '../../simulator/main';
import { StoreAndForward } from '../../simulator/store-and-forward';
import { commandRefusal } from '../../simulator/unit-commands';

const QED = demoSiteInfo('QED');
const T0 = Date.parse('2026-04-20T09:00:00Z');
const cmd = (kind: string, id: string, extra: object = {}) => ({
  v: 1 as const,
  commandId: id,
  ts: '2026-04-20T09:00:00Z',
  kind: kind as 'scan',
  ...extra,
});

function oneUnit(scenario = 'clear-day', start = { tiltDeg: 0, azimuthDeg: 180 }) {
  const world = frozenWorld(createScenarioWorld(scenario, QED, createRng(1)), T0);
  return createFleet(
    {
      sites: [{ site: QED, scenario, world, units: [{ serial: 'U-0001', siteCode: 'QED', start, weatherStation: true }] }],
      startUnixMs: T0,
    },
    { rng: createRng(7) },
  );
}

describe('virtual unit', () => {
  it('converges on the single peak of a clear sky and settles there', () => {
    const fleet = oneUnit();
    fleet.step(600);
    const u = fleet.unit('U-0001')!;
    const best = fleet.bestReachable(fleet.conditions('QED')!.field);
    expect(u.mode).toBe('settled');
    expect(u.last!.truePoaWm2).toBeGreaterThan(0.99 * best.wm2);
    expect(Math.abs(u.tilt.encoderDeg - best.tiltDeg)).toBeLessThan(4);
  });

  it('its trap truth measures it against the best its own axes reach: a unit limited to tilt 0…20° is not trapped at 20° under a high sun', () => {
    const world = frozenWorld(createScenarioWorld('clear-day', QED, createRng(1)), T0);
    const tilt = { minDeg: 0, maxDeg: 20, speedDegS: 4, backlashDeg: 0.3 };
    const fleet = createFleet(
      { sites: [{ site: QED, scenario: 'clear-day', world, units: [{ serial: 'U-0002', siteCode: 'QED', tilt }] }], startUnixMs: T0 },
      { rng: createRng(7) },
    );
    fleet.step(1800);
    const u = fleet.unit('U-0002')!;
    const field = fleet.conditions('QED')!.field;
    const own = fleet.bestReachable(field, { tiltRangeDeg: [0, 20], azimuthRangeDeg: [0, 360] });
    const standard = fleet.bestReachable(field);
    expect(standard.tiltDeg).toBeGreaterThan(30); // sun at about 45° elevation: a standard unit tilts further
    expect(own.tiltDeg).toBe(20);
    expect(own.wm2).toBeLessThan(standard.wm2);
    expect(u.mode).toBe('settled');
    expect(u.last!.truePoaWm2).toBeGreaterThan(0.98 * own.wm2);
    expect(fleet.truth().filter((r) => r.fault === 'trap')).toEqual([]);
  });

  it('every message it sends matches wire format v1', () => {
    const fleet = oneUnit();
    const msgs = fleet.step(120);
    const schema = { telemetry: telemetrySchema, events: eventSchema, acks: ackSchema, weather: weatherSchema };
    for (const m of msgs) expect(schema[m.leaf].safeParse(m.payload).success).toBe(true);
    expect(msgs.filter((m) => m.leaf === 'telemetry')).toHaveLength(24); // every 5 s
    expect(msgs.some((m) => m.leaf === 'weather')).toBe(true);
  });

  it('on hold it rejects motion commands and stops; release lets it move again; acks go accepted → done', () => {
    const fleet = oneUnit();
    fleet.step(5);
    fleet.command('U-0001', cmd('hold', 'c1'));
    fleet.command('U-0001', cmd('goto', 'c2', { tiltDeg: 40, azimuthDeg: 100 }));
    fleet.command('U-0001', cmd('scan', 'c3'));
    const before = fleet.unit('U-0001')!.tilt.encoderDeg;
    const acks = fleet
      .step(60)
      .filter((m) => m.leaf === 'acks')
      .map((m) => m.payload as { commandId: string; result: string; reason?: string });
    expect(acks.map((a) => `${a.commandId}:${a.result}`)).toEqual(['c1:accepted', 'c1:done', 'c2:rejected', 'c3:rejected']);
    expect(acks[2]!.reason).toMatch(/hold/);
    expect(fleet.unit('U-0001')!.mode).toBe('held');
    expect(fleet.unit('U-0001')!.tilt.encoderDeg).toBe(before);
    fleet.command('U-0001', cmd('release-hold', 'c4'));
    fleet.command('U-0001', cmd('goto', 'c5', { tiltDeg: 40, azimuthDeg: 100 }));
    const after = fleet
      .step(60)
      .filter((m) => m.leaf === 'acks')
      .map((m) => `${(m.payload as { commandId: string }).commandId}:${(m.payload as { result: string }).result}`);
    expect(after).toEqual(['c4:accepted', 'c4:done', 'c5:accepted', 'c5:done']);
    expect(Math.abs(fleet.unit('U-0001')!.tilt.encoderDeg - before)).toBeGreaterThan(5); // it went, then climbed on from there
  });

  it('scans its range, reports the samples in chunks, completes and acknowledges done', () => {
    const fleet = oneUnit();
    fleet.command('U-0001', cmd('scan', 's1'));
    const msgs = fleet.step(1800);
    const ev = msgs.filter((m) => m.leaf === 'events').map((m) => m.payload as { kind: string; samples?: unknown[] });
    const samples = ev.filter((e) => e.kind === 'scan-samples').flatMap((e) => e.samples!);
    expect(samples).toHaveLength(4 * 13);
    expect(ev.some((e) => e.kind === 'scan-complete')).toBe(true);
    const acks = msgs.filter((m) => m.leaf === 'acks').map((m) => (m.payload as { result: string }).result);
    expect(acks).toEqual(['accepted', 'done']);
  });

  it('stows itself in gusts above the stow limit and reports it', () => {
    const fleet = createFleet(
      { sites: [{ site: QED, scenario: 'gusty', units: [{ serial: 'G-1', siteCode: 'QED' }] }], startUnixMs: T0 },
      { rng: createRng(4) },
    );
    const msgs = fleet.step(6 * 3600);
    const stow = msgs.find((m) => m.leaf === 'events' && (m.payload as { code?: string }).code === 'wind-stow');
    expect(stow).toBeDefined();
    expect(fleet.truth().some((r) => r.fault === 'wind-stow')).toBe(true);
  });
});

describe('faults and ground truth', () => {
  it('injected faults appear in the ground truth with ISO start and end; a stall puts the unit in fault', () => {
    const fleet = oneUnit();
    fleet.step(10);
    fleet.injectFault('U-0001', 'stall', 600, 0);
    fleet.command('U-0001', cmd('goto', 'g1', { tiltDeg: 60, azimuthDeg: 90 }));
    const msgs = fleet.step(120);
    expect(fleet.unit('U-0001')!.mode).toBe('fault');
    expect(msgs.some((m) => m.leaf === 'events' && (m.payload as { code?: string }).code === 'actuator-stall')).toBe(true);
    fleet.step(600);
    const rec = fleet.truth().find((r) => r.fault === 'stall')!;
    expect(rec).toEqual({ serial: 'U-0001', fault: 'stall', start: '2026-04-20T09:00:10Z', end: '2026-04-20T09:10:10Z' });
  });

  it('a fault plan draws faults at the given rates', () => {
    const fleet = createFleet(
      { sites: demoFleetSites(), startUnixMs: T0, faults: parseFaultPlan('comms-loss=6,drift=3'), skyRefreshS: 600, maxStepS: 5 },
      { rng: createRng(9) },
    );
    fleet.step(4 * 3600);
    const kinds = new Set(fleet.truth().map((r) => r.fault));
    expect(kinds.has('comms-loss')).toBe(true);
    expect(kinds.has('drift')).toBe(true);
  });

  it('unknown scenario and fault names give the list of valid ones', () => {
    expect(() => parseFaultPlan('stall=1,wobble=2')).toThrow(
      /unknown fault "wobble"; valid faults: trap, stall, slip, drift, dead-detector, hunting, comms-loss, soiling, stuck-mode/,
    );
    expect(() => createScenarioWorld('fog', QED, createRng(1))).toThrow(UnknownNameError);
    expect(() => parseOptions(['--scenario', 'fog'])).toThrow(
      /valid scenarios: clear-day, overcast, broken-cloud, urban-canyon, glass-facade, atrium-lamps, gusty/,
    );
  });
});

describe('determinism and buffering', () => {
  it('the same seed gives the same run; another seed a different one', () => {
    const run = (seed: number) => {
      const f = createFleet(
        { sites: demoFleetSites(), startUnixMs: T0, faults: { hunting: 4, 'dead-detector': 4 }, skyRefreshS: 300 },
        { rng: createRng(seed) },
      );
      return JSON.stringify([f.step(900), f.truth()]);
    };
    expect(run(5)).toBe(run(5));
    expect(run(5)).not.toBe(run(6));
  });

  it('keeps messages while the link is down and sends them later in order with original timestamps', () => {
    const fleet = oneUnit();
    fleet.setTransport('U-0001', false);
    expect(fleet.step(60)).toHaveLength(0);
    fleet.setTransport('U-0001', true);
    const tel = fleet
      .step(5)
      .filter((m) => m.leaf === 'telemetry')
      .map((m) => m.payload as { seq: number; ts: string });
    expect(tel.map((t) => t.seq)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(tel[0]!.ts).toBe('2026-04-20T09:00:01Z');
  });

  it('a bounded buffer drops the oldest first and counts them', () => {
    const b = new StoreAndForward<number>(3);
    for (let i = 0; i < 5; i++) b.push(i);
    expect(b.drain()).toEqual([2, 3, 4]);
    expect(b.dropped).toBe(2);
  });
});

describe('command preconditions', () => {
  const axes = {
    tiltSpec: { minDeg: 0, maxDeg: 85, speedDegS: 4, backlashDeg: 0.3 },
    azimuthSpec: { minDeg: 0, maxDeg: 360, speedDegS: 4, backlashDeg: 0.4 },
  };
  const ready = {
    held: false,
    faultCode: null,
    manualStow: false,
    windStow: false,
    stuckStowed: false,
    stowGustMs: 18,
    tiltEncoderDeg: 30,
    azimuthEncoderDeg: 180,
    ...axes,
  };
  it('refuse motion on hold or in fault, goto outside the travel or while stowed, release-stow in a gust, an empty configure', () => {
    expect(commandRefusal(cmd('goto', 'a', { tiltDeg: 10 }), ready)).toBeNull();
    expect(commandRefusal(cmd('scan', 'b'), { ...ready, held: true })).toBe('unit is on maintenance hold');
    expect(commandRefusal(cmd('hold', 'c'), { ...ready, held: true })).toBeNull();
    expect(commandRefusal(cmd('stow', 'd'), { ...ready, faultCode: 'actuator-stall' })).toBe('unit is in fault: actuator-stall');
    expect(commandRefusal(cmd('goto', 'e', { tiltDeg: 88 }), ready)).toBe('tiltDeg outside 0…85');
    expect(commandRefusal(cmd('goto', 'f'), ready)).toBe('goto needs tiltDeg and/or azimuthDeg');
    expect(commandRefusal(cmd('goto', 'g', { azimuthDeg: 90 }), { ...ready, windStow: true })).toBe(
      'unit is stowed; release the stow first',
    );
    expect(commandRefusal(cmd('release-stow', 'h'), { ...ready, windStow: true })).toBe('gusts above the stow limit (18 m/s)');
    expect(commandRefusal(cmd('configure', 'i', { config: {} }), ready)).toBe('configure needs a config');
  });
});
