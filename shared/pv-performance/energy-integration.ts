/**
 * Energy of a sampled power series by the trapezoidal rule (exact for piecewise-linear power; second-order accurate
 * otherwise), the integration IEC 61724-1 leaves to the monitoring system (common practice). A gap longer than
 * `maxGapMs` between two samples contributes nothing: missing data is reported as missing, never filled in. Times in
 * epoch milliseconds, power in watts, energy in watt-hours.
 */

export interface PowerSample {
  tMs: number;
  powerW: number;
}

export interface IntegratedEnergy {
  energyWh: number;
  /** Time covered by integrated intervals [ms]. */
  coveredMs: number;
  /** Time inside gaps that were left out [ms]. */
  gapMs: number;
}

/** Integrates samples sorted by time (throws a RangeError naming the first unsorted or non-finite sample). */
export function integrateEnergyWh(samples: readonly PowerSample[], maxGapMs: number): IntegratedEnergy {
  if (!Number.isFinite(maxGapMs) || maxGapMs <= 0) throw new RangeError(`maxGapMs: must be a positive number; got ${maxGapMs}`);
  let energyWh = 0;
  let coveredMs = 0;
  let gapMs = 0;
  for (let i = 0; i < samples.length; i++) {
    const s = samples[i]!;
    if (!Number.isFinite(s.tMs) || !Number.isFinite(s.powerW)) throw new RangeError(`samples[${i}]: time and power must be finite numbers`);
    if (i === 0) continue;
    const p = samples[i - 1]!;
    const dt = s.tMs - p.tMs;
    if (dt <= 0) throw new RangeError(`samples[${i}]: times must increase; ${s.tMs} follows ${p.tMs}`);
    if (dt > maxGapMs) {
      gapMs += dt;
      continue;
    }
    energyWh += ((p.powerW + s.powerW) / 2) * (dt / 3_600_000);
    coveredMs += dt;
  }
  return { energyWh, coveredMs, gapMs };
}
