import { describe, it } from 'vitest';
import { runEval } from './run-eval';
import { expectTargets } from './eval-targets';

// The offline evaluation on a fixed seed (a tuning seed, not one of the reported ones), on a small fleet so the test stays short.
describe('offline evaluation, seed 4', () => {
  it("meets the detection targets against the simulator's ground truth", () => {
    const { result } = runEval({ seed: 4, units: 8, hours: 36 });
    expectTargets(result);
  }, 300_000);
});
