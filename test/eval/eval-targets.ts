import { expect } from 'vitest';
import type { EvalResult } from './run-eval';

/** The contract: trap precision ≥ 0.95 and recall ≥ 0.90; every other detector ≥ 0.90 / 0.90. */
export const CONTRACT = { trap: { precision: 0.95, recall: 0.9 }, other: { precision: 0.9, recall: 0.9 } };
/** Every detector is held to the contract: trap ≥ 0.95 / 0.90, the others ≥ 0.90 / 0.90. */
export const ASSERTED: Record<string, { precision: number; recall: number }> = {
  trap: CONTRACT.trap,
};

export function expectTargets(r: EvalResult): void {
  for (const [kind, d] of Object.entries(r.detectors)) {
    const t = ASSERTED[kind] ?? CONTRACT.other;
    if (d.alarms > 0) expect(d.precision, `${kind} precision`).toBeGreaterThanOrEqual(t.precision);
    if (d.eligible > 0) expect(d.recall, `${kind} recall`).toBeGreaterThanOrEqual(t.recall);
  }
  // Enough happened to judge: faults of most kinds were injected and seen.
  expect(Object.values(r.detectors).filter((d) => d.eligible > 0).length).toBeGreaterThanOrEqual(4);
}
