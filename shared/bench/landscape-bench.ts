/**
 * Landscape benchmark: fast (closed form + spherical harmonics) against brute-force quadrature at 1° over
 * tilt 0–90° × azimuth 0–359° for three skies: clear with a facade reflection, CIE overcast, urban canyon with a
 * horizon profile. Single thread. Fast time includes building the sky and its spherical-harmonic model (a new sky
 * each repetition; median of 7 after one warm-up). Errors are relative to brute force where E > 10 W/m².
 *
 *   npm run bench:landscape            readable table
 *   npm run bench:landscape -- --json  last stdout line: { fastMs, bruteMs, speedup, meanRelErr, maxRelErr }
 * Targets: fast ≤ 50 ms per landscape, ≥ 50× faster than brute force, mean rel. error ≤ 1 %, max ≤ 3 %.
 */
import { buildSky, computeLandscape, type SkyInput } from '../landscape/index';

const skies: Record<string, SkyInput> = {
  'clear + facade reflection': {
    sun: { azimuthDeg: 110, elevationDeg: 20, dniWm2: 700 },
    dhiWm2: 100,
    skyType: 12,
    albedo: 0.2,
    reflectors: [
      { normalAzimuthDeg: 90, azimuthFromDeg: 230, azimuthToDeg: 300, elevationFromDeg: 0, elevationToDeg: 40, reflectance: 0.35 },
    ],
  },
  'CIE overcast (type 1)': { sun: { azimuthDeg: 200, elevationDeg: 25, dniWm2: 0 }, dhiWm2: 150, skyType: 1, albedo: 0.2 },
  'urban canyon + horizon': {
    sun: { azimuthDeg: 230, elevationDeg: 40, dniWm2: 600 },
    dhiWm2: 150,
    skyType: 9,
    albedo: 0.25,
    horizon: [
      [0, 10],
      [60, 10],
      [60, 45],
      [150, 45],
      [150, 5],
      [200, 5],
      [200, 38],
      [300, 38],
      [300, 12],
    ],
  },
};

const json = process.argv.includes('--json');
const rows: { name: string; fastMs: number; bruteMs: number; meanRelErr: number; maxRelErr: number; cells: number }[] = [];
const grid = { stepDeg: 1, tiltRangeDeg: [0, 90] as const };

for (const [name, input] of Object.entries(skies)) {
  computeLandscape(buildSky(input), grid); // warm-up (JIT)
  const times: number[] = [];
  let fast = computeLandscape(buildSky(input), grid);
  for (let r = 0; r < 7; r++) {
    const t0 = performance.now();
    fast = computeLandscape(buildSky(input), grid);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  const t0 = performance.now();
  const brute = computeLandscape(buildSky(input), { ...grid, method: 'brute' });
  const bruteMs = performance.now() - t0;
  let sum = 0;
  let n = 0;
  let max = 0;
  for (let k = 0; k < brute.values.length; k++) {
    const b = brute.values[k]!;
    if (b <= 10) continue;
    const r = Math.abs(fast.values[k]! - b) / b;
    sum += r;
    n++;
    if (r > max) max = r;
  }
  rows.push({ name, fastMs: times[3]!, bruteMs, meanRelErr: sum / n, maxRelErr: max, cells: brute.values.length });
}

const mean = (f: (r: (typeof rows)[number]) => number) => rows.reduce((a, r) => a + f(r), 0) / rows.length;
const summary = {
  fastMs: mean((r) => r.fastMs),
  bruteMs: mean((r) => r.bruteMs),
  speedup: mean((r) => r.bruteMs) / mean((r) => r.fastMs),
  meanRelErr: mean((r) => r.meanRelErr),
  maxRelErr: Math.max(...rows.map((r) => r.maxRelErr)),
};

if (!json) {
  const pad = (s: string, w: number) => s.padEnd(w);
  console.log(`irradiance landscape, 1° grid, ${rows[0]!.cells} normals (tilt 0–90° × azimuth 0–359°), single thread`);
  console.log(`${pad('sky', 28)}${pad('fast ms', 10)}${pad('brute ms', 11)}${pad('speedup', 9)}${pad('mean err', 10)}max err`);
  for (const r of rows) {
    console.log(
      `${pad(r.name, 28)}${pad(r.fastMs.toFixed(1), 10)}${pad(r.bruteMs.toFixed(0), 11)}${pad((r.bruteMs / r.fastMs).toFixed(0) + '×', 9)}` +
        `${pad((r.meanRelErr * 100).toFixed(3) + ' %', 10)}${(r.maxRelErr * 100).toFixed(3)} %`,
    );
  }
  console.log(
    `${pad('all (mean; max err: max)', 28)}${pad(summary.fastMs.toFixed(1), 10)}${pad(summary.bruteMs.toFixed(0), 11)}${pad(summary.speedup.toFixed(0) + '×', 9)}` +
      `${pad((summary.meanRelErr * 100).toFixed(3) + ' %', 10)}${(summary.maxRelErr * 100).toFixed(3)} %`,
  );
  console.log('targets: fast ≤ 50 ms, speedup ≥ 50×, mean err ≤ 1 %, max err ≤ 3 % (where E > 10 W/m²)');
} else {
  console.log(JSON.stringify(summary));
}
