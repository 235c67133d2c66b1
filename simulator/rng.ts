/**
 * Seeded pseudo-random source for the simulator. Everything random in a run (noise, gusts, clouds, faults) draws from an
 * Rng derived from the run's seed, so the same seed and the same steps give the same run. `Math.random` is not used in simulator/.
 *
 * Generator: sfc32 (a small chaotic counter-based generator, 128-bit state), seeded through a 32-bit string hash.
 */
export interface Rng {
  /** Uniform in [0, 1). */
  next(): number;
  /** Uniform in [lo, hi). */
  uniform(lo: number, hi: number): number;
  /** Standard normal (mean 0, sd 1). */
  normal(): number;
  /** Exponential with the given mean. */
  exponential(mean: number): number;
  /** Whether an event with probability p happens. */
  chance(p: number): boolean;
  /** An independent stream for a named part of the run (a unit, a site); the same label always gives the same stream. */
  fork(label: string): Rng;
}

/** 32-bit FNV-1a hash of a string. */
function hash32(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return h >>> 0;
}

export function createRng(seed: number | string): Rng {
  const key = String(seed);
  let a = hash32(`a:${key}`);
  let b = hash32(`b:${key}`);
  let c = hash32(`c:${key}`);
  let d = 1;
  const next32 = (): number => {
    const t = (((a + b) | 0) + d) | 0;
    d = (d + 1) | 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) | 0;
    c = (c << 21) | (c >>> 11);
    c = (c + t) | 0;
    return t >>> 0;
  };
  for (let i = 0; i < 12; i++) next32(); // mix the seed in
  let spare: number | null = null;
  const rng: Rng = {
    next: () => next32() / 4294967296,
    uniform: (lo, hi) => lo + (hi - lo) * rng.next(),
    normal: () => {
      if (spare !== null) {
        const s = spare;
        spare = null;
        return s;
      }
      let u = 0;
      while (u === 0) u = rng.next();
      const v = rng.next();
      const r = Math.sqrt(-2 * Math.log(u));
      spare = r * Math.sin(2 * Math.PI * v);
      return r * Math.cos(2 * Math.PI * v);
    },
    exponential: (mean) => {
      let u = 0;
      while (u === 0) u = rng.next();
      return -mean * Math.log(u);
    },
    chance: (p) => rng.next() < p,
    fork: (label) => createRng(`${key}/${label}`),
  };
  return rng;
}
