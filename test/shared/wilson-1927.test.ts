import { describe, expect, it } from 'vitest';
import { wilsonInterval, Z_95 } from '../../shared/statistics/wilson-1927';

// Worked values: R. G. Newcombe (1998), "Two-sided confidence intervals for the single proportion: comparison of seven
// methods", Statistics in Medicine 17(8):857–872, Table II, method 3 (Wilson score, z = 1.96), to the table's 4 decimals
// (from memory of the table).
describe('Wilson score interval (Wilson 1927)', () => {
  it.each([
    [81, 263, 0.2553, 0.3662],
    [15, 148, 0.0624, 0.1605],
    [0, 20, 0, 0.1611],
    [1, 29, 0.0061, 0.1718],
  ])('%i of %i gives %f…%f (Newcombe 1998, Table II)', (k, n, lo, hi) => {
    const w = wilsonInterval(k, n, 1.96)!;
    expect(w.low).toBeCloseTo(lo, 4);
    expect(w.high).toBeCloseTo(hi, 4);
  });

  it('no successes: the upper bound is z²/(n + z²), and all successes mirror it (derived from Wilson 1927)', () => {
    const z2 = Z_95 * Z_95;
    expect(wilsonInterval(0, 50)!.high).toBeCloseTo(z2 / (50 + z2), 12);
    expect(wilsonInterval(50, 50)).toEqual({ low: expect.closeTo(50 / (50 + z2), 12), high: 1 });
  });

  it('has no interval for no trials and refuses counts that are not counts', () => {
    expect(wilsonInterval(0, 0)).toBeNull();
    expect(() => wilsonInterval(3, 2)).toThrow(/successes/);
    expect(() => wilsonInterval(1.5, 4)).toThrow(/successes/);
    expect(() => wilsonInterval(1, -1)).toThrow(/trials/);
    expect(() => wilsonInterval(1, 4, 0)).toThrow(/z/);
  });
});
