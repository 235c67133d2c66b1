import { describe, expect, it } from 'vitest';
import { runEval } from './run-eval';
import { expectTargets } from './eval-targets';

describe('offline evaluation, seed 5', () => {
  it("meets the detection targets against the simulator's ground truth", () => {
    const { result } = runEval({ seed: 5, units: 8, hours: 36 });
    expectTargets(result);
  }, 300_000);

  it('a fault-free fleet raises at most 1 false alarm per 100 unit-days', () => {
    const { result } = runEval({ seed: 5, units: 8, hours: 24, faultFree: true });
    expect(result.injected).toBe(0);
    expect(result.falseAlarmsPer100UnitDays).toBeLessThanOrEqual(1);
  }, 300_000);
});
