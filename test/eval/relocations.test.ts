import { describe, expect, it } from 'vitest';
import { createFleet } from '../../simulator/fleet';
import { createRng } from '../../simulator/rng';
import { createScenarioWorld, frozenWorld } from '../../simulator/scenarios';
import { demoSiteInfo } from '../../simulator/demo-fleet';
import type { UnitRef } from '../../server/health/unit-sample';
import { createRelocations } from './relocations';

// The glass-facade roof at 06:00 UTC in May: the sun behind the tower block, its image in the west facade the brightest
// lobe, the sky's own lobe a lesser peak (about a quarter of the best for an 8° detector tilt).
const QHL = demoSiteInfo('QHL');
const AT = Date.parse('2026-05-04T06:00:00Z');

function roof(holdS?: number) {
  const world = frozenWorld(createScenarioWorld('glass-facade', QHL, createRng(1)), AT);
  const fleet = createFleet(
    {
      sites: [
        {
          site: QHL,
          scenario: 'glass-facade',
          world,
          units: [{ serial: 'QHL-E001', siteCode: 'QHL', controller: { detectorTiltDeg: 8 } }],
        },
      ],
      startUnixMs: AT,
    },
    { rng: createRng(1) },
  );
  const ref: UnitRef = { unitId: 1, serial: 'QHL-E001', siteId: 1, detectorTiltDeg: 8 };
  // Let the unit find the best lobe first.
  for (let i = 0; i < 12 * 20; i++) fleet.step(5);
  const r = createRelocations(fleet, new Map([[ref.serial, ref]]));
  r.add({
    serial: 'QHL-E001',
    kind: 'lesser-peak',
    startMs: fleet.now(),
    durationS: 4 * 3600,
    target: holdS ? 1 : 0,
    ...(holdS ? { holdS } : {}),
  });
  return { fleet, r, ref };
}

describe('lesser-peak relocation (the evaluation’s realistic trap)', () => {
  it('sends the unit into a lesser peak’s basin by a go-to; it stays trapped and the truth records it', () => {
    const { fleet, r } = roof();
    const before = fleet.unit('QHL-E001')!.last!.truePoaWm2;
    for (let i = 0; i < 12 * 40; i++) {
      r.step();
      fleet.step(5);
    }
    expect(r.counts()).toEqual({ scheduled: 1, placed: 1 });
    const u = fleet.unit('QHL-E001')!;
    expect(u.mode).toBe('settled');
    expect(u.last!.truePoaWm2).toBeLessThan(0.8 * before);
    const traps = fleet.truth().filter((t) => t.fault === 'trap' && t.serial === 'QHL-E001');
    expect(traps).toHaveLength(1);
    expect(traps[0]!.end).toBeNull();
  }, 60_000);

  it('after maintenance: held first (and known held), then parked there and released', () => {
    const { fleet, r, ref } = roof(20 * 60);
    r.step();
    fleet.step(5);
    expect(fleet.unit('QHL-E001')!.held).toBe(true);
    expect(ref.onHold).toBe(true);
    for (let i = 0; i < 12 * 50; i++) {
      r.step();
      fleet.step(5);
    }
    expect(ref.onHold).toBe(false);
    expect(fleet.unit('QHL-E001')!.held).toBe(false);
    expect(r.counts().placed).toBe(1);
    expect(fleet.truth().some((t) => t.fault === 'trap' && t.serial === 'QHL-E001')).toBe(true);
  }, 60_000);
});
