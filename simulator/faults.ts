/**
 * Faults with ground truth. A fault plan gives each kind a rate (expected occurrences per unit per simulated day); at each
 * step every unit may start a fault of each kind, which then lasts a random time around the kind's typical duration.
 * Every fault becomes a truth record `{ serial, fault, start, end }` (ISO 8601 UTC; `end` null while still active when
 * the run stops). Besides injected faults, two conditions are recorded as observed truth: `trap` (settled on a local
 * maximum well below the best reachable orientation) and `wind-stow` (stowed for gusts).
 */
import { UnknownNameError } from './scenarios';

export const FAULT_KINDS = ['trap', 'stall', 'slip', 'drift', 'dead-detector', 'hunting', 'comms-loss', 'soiling', 'stuck-mode'] as const;
export type FaultKind = (typeof FAULT_KINDS)[number];

/** Typical duration of each kind [simulated hours]; a fault lasts an exponential time with this mean (at least 5 min). */
export const FAULT_MEAN_HOURS: Record<FaultKind, number> = {
  trap: 3,
  stall: 2,
  slip: 4,
  drift: 12,
  'dead-detector': 6,
  hunting: 2,
  'comms-loss': 0.5,
  soiling: 72,
  'stuck-mode': 3,
};

export type FaultPlan = Partial<Record<FaultKind, number>>;

/** Parses `kind=rate,kind=rate` (rate per unit per simulated day; a bare kind means 1). Unknown kinds throw with the list. */
export function parseFaultPlan(text: string): FaultPlan {
  const plan: FaultPlan = {};
  for (const part of text
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean)) {
    const [kind, rateText] = part.split('=');
    if (!(FAULT_KINDS as readonly string[]).includes(kind!)) throw new UnknownNameError('fault', kind!, FAULT_KINDS);
    const rate = rateText === undefined ? 1 : Number(rateText);
    if (!Number.isFinite(rate) || rate < 0)
      throw new RangeError(`fault rate for ${kind} must be a number ≥ 0 (per unit per day), got ${rateText}`);
    plan[kind as FaultKind] = rate;
  }
  return plan;
}

/** One ground-truth record. `truthKind` includes the observed conditions. */
export type TruthKind = FaultKind | 'wind-stow';

export interface TruthRecord {
  serial: string;
  fault: TruthKind;
  start: string;
  end: string | null;
}

/** An active injected fault on a unit, with what it changed. */
export interface ActiveFault {
  kind: FaultKind;
  startMs: number;
  endMs: number;
  /** Which axis or detector it hit, where that applies. */
  target: number;
}
