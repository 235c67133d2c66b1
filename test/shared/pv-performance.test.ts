import { describe, expect, it } from 'vitest';
import {
  availabilityOf,
  finalYieldH,
  hoursInLocalMonth,
  integrateEnergyWh,
  isoWithOffset,
  localMonth,
  performanceRatio,
  referenceYieldH,
  temperatureCorrectedPr,
  temperatureFactor,
  yieldsOf,
  type AvailabilityPeriod,
} from '../../shared/pv-performance';

describe('IEC 61724-1 yields and performance ratio', () => {
  it('reproduces the worked example (physics.md §7: P0 100 kWp, Hi 6.5 kWh/m², Eout 520 kWh)', () => {
    expect(referenceYieldH(6.5)).toBeCloseTo(6.5, 12); // Yr = Hi / 1 kW/m² (IEC 61724-1)
    expect(finalYieldH(520, 100)).toBeCloseTo(5.2, 12); // Yf = Eout / P0 (IEC 61724-1)
    expect(performanceRatio(5.2, 6.5)).toBeCloseTo(0.8, 12); // PR = Yf / Yr (IEC 61724-1)
  });

  it('corrects PR to 25 °C (physics.md §7: γ −0.40 %/K, Tmod 45 °C → Ck 0.92, PR_STC 0.8696)', () => {
    expect(temperatureFactor(-0.004, 45)).toBeCloseTo(0.92, 12);
    const pr = temperatureCorrectedPr([{ eoutKwh: 520, hiKwhM2: 6.5, tmodC: 45 }], 100, -0.004);
    expect(pr!).toBeCloseTo(0.8696, 4);
    const y = yieldsOf({ p0Kwp: 100, hiKwhM2: 6.5, eoutKwh: 520, gammaPerK: -0.004, tmodC: 45 });
    expect(y.yrH).toBeCloseTo(6.5, 12);
    expect(y.yfH).toBeCloseTo(5.2, 12);
    expect(y.pr!).toBeCloseTo(0.8, 12);
    expect(y.prTempCorrected!).toBeCloseTo(0.869565, 6);
  });

  it('sums intervals before dividing (IEC 61724-1 form Σ Eout,k / Σ P0·Ck·Hi,k)', () => {
    // Derived from the definition: two intervals at 25 °C and 45 °C.
    const pr = temperatureCorrectedPr(
      [
        { eoutKwh: 40, hiKwhM2: 0.5, tmodC: 25 },
        { eoutKwh: 46, hiKwhM2: 0.5, tmodC: 45 },
      ],
      100,
      -0.004,
    );
    expect(pr!).toBeCloseTo(86 / (50 * 1 + 50 * 0.92), 12);
  });

  it('gives no ratio without irradiation and refuses bad input by name', () => {
    expect(performanceRatio(0, 0)).toBeNull();
    expect(() => finalYieldH(10, 0)).toThrow(/p0Kwp: must be greater than 0/);
    expect(() => referenceYieldH(-1)).toThrow(/hiKwhM2: must be at least 0/);
    expect(() => temperatureFactor(-0.4, 45)).toThrow(/gammaPerK/);
  });
});

describe('energy integration of a sampled power series', () => {
  it('matches the closed form of a half-sine day (∫ Pmax·sin(πt/T) dt = 2·Pmax·T/π)', () => {
    // Closed-form integral of a synthetic trace (derived): Pmax 1000 W over T = 12 h → 2·1000·12/π Wh.
    const T = 12 * 3_600_000;
    const samples = Array.from({ length: 12 * 60 + 1 }, (_, i) => ({
      tMs: i * 60_000,
      powerW: 1000 * Math.sin((Math.PI * i * 60_000) / T),
    }));
    const r = integrateEnergyWh(samples, 5 * 60_000);
    expect(r.energyWh).toBeCloseTo((2 * 1000 * 12) / Math.PI, 1); // trapezoid error ≈ 1e-5 relative at 1-min steps
    expect(Math.abs(r.energyWh / ((2 * 1000 * 12) / Math.PI) - 1)).toBeLessThan(1e-5);
    expect(r.gapMs).toBe(0);
  });

  it('is exact for a linear ramp and invents nothing across a gap', () => {
    // Ramp 0 → 600 W over 1 h: 300 Wh (closed form); then a 2-h gap, then 1 h at a constant 100 W: 100 Wh.
    const h = 3_600_000;
    const r = integrateEnergyWh(
      [
        { tMs: 0, powerW: 0 },
        { tMs: h, powerW: 600 },
        { tMs: 3 * h, powerW: 100 },
        { tMs: 4 * h, powerW: 100 },
      ],
      90 * 60_000,
    );
    expect(r.energyWh).toBeCloseTo(400, 9);
    expect(r.gapMs).toBe(2 * h);
    expect(r.coveredMs).toBe(2 * h);
    expect(() =>
      integrateEnergyWh(
        [
          { tMs: 5, powerW: 1 },
          { tMs: 5, powerW: 1 },
        ],
        1000,
      ),
    ).toThrow(/samples\[1\]: times must increase/);
  });
});

describe('local calendar months', () => {
  it('counts 743 h in March and 745 h in October 2026 in Europe/Berlin (EU summer time: last Sundays of March and October)', () => {
    expect(hoursInLocalMonth('2026-03', 'Europe/Berlin')).toBe(743);
    expect(hoursInLocalMonth('2026-10', 'Europe/Berlin')).toBe(745);
    expect(hoursInLocalMonth('2026-06', 'Europe/Berlin')).toBe(720);
    expect(hoursInLocalMonth('2026-03', 'UTC')).toBe(744);
    const march = localMonth('2026-03', 'Europe/Berlin');
    expect(march.days.find((d) => d.date === '2026-03-29')!.hours).toBe(23);
    expect(new Date(march.fromMs).toISOString()).toBe('2026-02-28T23:00:00.000Z');
    expect(new Date(march.toMs).toISOString()).toBe('2026-03-31T22:00:00.000Z');
    expect(localMonth('2026-10', 'Europe/Berlin').days.find((d) => d.date === '2026-10-25')!.hours).toBe(25);
  });

  it('writes instants in ISO 8601 with the offset in force', () => {
    expect(isoWithOffset(Date.parse('2026-03-29T01:00:00Z'), 'Europe/Berlin')).toBe('2026-03-29T03:00:00+02:00');
    expect(isoWithOffset(Date.parse('2026-03-29T00:59:00Z'), 'Europe/Berlin')).toBe('2026-03-29T01:59:00+01:00');
    expect(isoWithOffset(Date.parse('2026-07-01T12:00:00Z'), 'America/St_Johns')).toBe('2026-07-01T09:30:00-02:30');
  });
});

describe('availability (common practice, physics.md §7; raw vs contractual after SAND2015-10223)', () => {
  const H = 3_600_000;
  const p = (h: number, down: AvailabilityPeriod['downCategory'], actualKwh: number, lostKwh = 0, daylight = true): AvailabilityPeriod => ({
    durationMs: h * H,
    daylight,
    downCategory: down,
    actualKwh,
    lostKwh,
  });

  it('computes a hand-built month: 100 h daylight with a 5-h wind stow, a 3-h hold and a 2-h outage', () => {
    const a = availabilityOf([
      p(90, null, 900),
      p(5, 'out-of-environmental-specification', 0, 40),
      p(3, 'scheduled-maintenance', 0, 30),
      p(2, 'forced-outage', 0, 20),
      p(300, 'forced-outage', 0, 0, false), // night: never counted
    ]);
    expect(a.usefulMs).toBe(100 * H);
    expect(a.downMs).toBe(10 * H);
    expect(a.excludedMs).toBe(8 * H);
    expect(a.timeRaw).toBeCloseTo(0.9, 12); // (100 − 10) / 100
    expect(a.timeContractual).toBeCloseTo(0.98, 12); // (100 − 10 + 8) / 100
    expect(a.energyRaw).toBeCloseTo(900 / 990, 12); // 900 / (900 + 90)
    expect(a.energyContractual).toBeCloseTo(900 / 920, 12); // 900 / (900 + 90 − 70)
  });

  it('has no figure without daylight', () => {
    const a = availabilityOf([p(10, null, 0, 0, false)]);
    expect(a.timeRaw).toBeNull();
    expect(a.energyRaw).toBeNull();
  });
});
