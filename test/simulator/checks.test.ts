import { describe, expect, it } from 'vitest';
import { analyseLandscape } from '../../shared/landscape';
import { createFleet, TRAP_RATIO } from '../../simulator/fleet';
import { createRng } from '../../simulator/rng';
import { demoSiteInfo } from '../../simulator/demo-fleet';
import { createScenarioWorld, frozenWorld } from '../../simulator/scenarios';
import { irradianceTiltAz } from '../../simulator/sky-field';

// Facts of the trade the simulated fleet must reproduce (common practice).
const QHL = demoSiteInfo('QHL');
const QED = demoSiteInfo('QED');
const DAY = '2026-04-20';

function dayRun(scenario: string, site = QED, tilts = [20]) {
  const fleet = createFleet(
    {
      sites: [
        { site, scenario, units: tilts.map((d) => ({ serial: `CHK-${d}`, siteCode: site.code, controller: { detectorTiltDeg: d } })) },
      ],
      startUnixMs: Date.parse(`${DAY}T02:00:00Z`),
      skyRefreshS: 120,
      maxStepS: 2,
    },
    { rng: createRng('checks') },
  );
  fleet.step(20 * 3600);
  return fleet.baselines();
}

describe('facts of the trade (common practice)', () => {
  it('under full overcast a horizontal panel gets more than one pointed at the sun, by the closed-form ratio', () => {
    const world = createScenarioWorld('overcast', { ...QED, albedo: 0.2 }, createRng(1));
    // Find the instant when the sun is 30° high in the morning and compare with physics.md §8: 0.719·Eh (Moon–Spencer, ρ 0.2).
    let t = Date.parse(`${DAY}T04:00:00Z`);
    let c = world.at(t, 0);
    while (c.sunElevationDeg < 30) c = world.at((t += 30_000), 30);
    const eh = irradianceTiltAz(c.field, 0, 0);
    const ePointed = irradianceTiltAz(c.field, 90 - c.sunElevationDeg, c.sunAzimuthDeg);
    expect(ePointed).toBeLessThan(eh);
    expect(ePointed / eh).toBeCloseTo(0.719, 2);
    // And over a whole overcast day the horizontal orientation beats the sun-following twin.
    const fleet = createFleet(
      {
        sites: [
          { site: QED, scenario: 'overcast', units: [{ serial: 'FLAT-1', siteCode: 'QED', start: { tiltDeg: 0, azimuthDeg: 180 } }] },
        ],
        startUnixMs: Date.parse(`${DAY}T02:00:00Z`),
        skyRefreshS: 300,
        maxStepS: 10,
      },
      { rng: createRng(2) },
    );
    fleet.unit('FLAT-1')!.handleCommand({ v: 1, commandId: 'h', ts: `${DAY}T02:00:00Z`, kind: 'hold' }, fleet.now());
    fleet.step(20 * 3600);
    const b = fleet.baselines()[0]!;
    expect(b.unitPoaWhm2).toBeGreaterThan(b.sunFollowingPoaWhm2 * 1.1);
  });

  it('on a clear unobstructed day a unit harvests within 2 % of the sun-following twin', () => {
    const [b] = dayRun('clear-day');
    expect(Math.abs(b!.unitPoaWhm2 / b!.sunFollowingPoaWhm2 - 1)).toBeLessThan(0.02);
    expect(b!.unitPoaWhm2).toBeGreaterThan(b!.fixedTiltPoaWhm2 * 1.15);
  });

  it('with building shade and facade reflections, units with adequate detector tilt harvest ≥ 10 % more than the sun-following twin', () => {
    const rows = dayRun('glass-facade', QHL, [20, 30]);
    for (const b of rows) expect(b.unitPoaWhm2).toBeGreaterThan(1.1 * b.sunFollowingPoaWhm2);
  });

  it('a unit with detector tilt below the minimum single-peak tilt is trapped in the multi-lobe sky; one above it is not', () => {
    const at = Date.parse(`${DAY}T08:40:00Z`);
    const world = frozenWorld(createScenarioWorld('glass-facade', QHL, createRng(1)), at);
    const sky = world.at(at, 0).field.sky;
    const report = analyseLandscape(sky, { tiltRangeDeg: [0, 85], stepDeg: 2, maxDetectorTiltDeg: 40 });
    const minTilt = report.minSinglePeakDetectorTiltDeg!;
    expect(report.localMaxima.length).toBeGreaterThan(1);
    expect(minTilt).toBeGreaterThan(8);
    expect(minTilt).toBeLessThan(30);
    // Both start on the weakest lobe (where they would be after following it). The engine blurs the landscape
    // separably (tilt, then sideways) while a unit's pairs read point values at its own tilt, and a unit has a deadband,
    // so the wide unit gets a margin of 10° above the engine's threshold and the narrow one 5° below it.
    const weak = report.localMaxima.reduce((a, p) => (p.wm2 < a.wm2 ? p : a));
    expect(weak.wm2).toBeLessThan(0.9 * report.globalMax.wm2);
    const fleet = createFleet(
      {
        sites: [
          {
            site: QHL,
            scenario: 'glass-facade',
            world,
            units: [minTilt - 5, minTilt + 10].map((d, i) => ({
              serial: `TRAP-${i}`,
              siteCode: 'QHL',
              controller: { detectorTiltDeg: d },
              start: { tiltDeg: weak.tiltDeg, azimuthDeg: weak.azimuthDeg },
            })),
          },
        ],
        startUnixMs: at,
      },
      { rng: createRng(3) },
    );
    fleet.step(40 * 60);
    const best = fleet.bestReachable(world.at(at, 0).field).wm2;
    const narrow = fleet.unit('TRAP-0')!;
    const wide = fleet.unit('TRAP-1')!;
    expect(narrow.mode).toBe('settled');
    expect(narrow.last!.truePoaWm2).toBeLessThan(TRAP_RATIO * best);
    expect(wide.last!.truePoaWm2).toBeGreaterThan(0.93 * best);
    const traps = fleet.truth().filter((r) => r.fault === 'trap');
    expect(traps.map((r) => r.serial)).toEqual(['TRAP-0']);
  });
});
