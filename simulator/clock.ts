/**
 * Time for the simulator. The fleet model never reads the wall clock: it is stepped with simulated seconds and told the
 * simulated instant. A Clock maps between them for live runs; tests and offline runs pass simulated instants directly.
 */
export interface Clock {
  /** Simulated instant, epoch ms. */
  now(): number;
}

/**
 * The wall clock, the only place in simulator/ that reads real time: the composition root (main.ts, the bench) injects it.
 * Built on the monotonic performance timer anchored at process start, so it never jumps backwards.
 */
export function wallClock(): Clock {
  return { now: () => performance.timeOrigin + performance.now() };
}

/**
 * Simulated time that runs `speed` times faster than `real`, starting at `startUnixMs` when created
 * (speed 60 = one simulated minute per real second).
 */
export function acceleratedClock(real: Clock, startUnixMs: number, speed: number): Clock {
  if (!(speed > 0)) throw new RangeError(`speed must be > 0, got ${speed}`);
  const realStart = real.now();
  return { now: () => startUnixMs + (real.now() - realStart) * speed };
}

/** ISO 8601 UTC with milliseconds dropped when zero, as the wire format wants. */
export function isoUtc(unixMs: number): string {
  const s = new Date(Math.round(unixMs)).toISOString();
  return s.endsWith('.000Z') ? `${s.slice(0, -5)}Z` : s;
}
