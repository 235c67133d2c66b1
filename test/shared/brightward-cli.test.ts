import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = join(__dirname, '..', '..');
function cli(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'shared/cli/main.ts', ...args], { cwd: root, encoding: 'utf8' });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}
const dir = mkdtempSync(join(tmpdir(), 'brightward-cli-'));
function skyFile(value: unknown): string {
  const path = join(
    dir,
    `${Math.abs(
      JSON.stringify(value)
        .split('')
        .reduce((h, c) => (h * 31 + c.charCodeAt(0)) | 0, 7),
    )}.json`,
  );
  writeFileSync(path, typeof value === 'string' ? value : JSON.stringify(value));
  return path;
}

describe('brightward sun', () => {
  it('reproduces the SPA worked example (Reda & Andreas 2008, Table A5.1) and the pinned local-day events', () => {
    const r = cli(
      'sun',
      '--lat',
      '39.742476',
      '--lon',
      '-105.1786',
      '--elev',
      '1830.14',
      '--pressure',
      '820',
      '--temp',
      '11',
      '--delta-t',
      '67',
      '--time',
      '2003-10-17T12:30:30-07:00',
      '--slope',
      '30',
      '--surface-azimuth',
      '170',
    );
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Math.abs(out.zenithDeg - 50.11162)).toBeLessThan(1e-5); // Table A5.1
    expect(Math.abs(out.azimuthDeg - 194.340241)).toBeLessThan(1e-5); // Table A5.1
    expect(Math.abs(out.incidenceDeg - 25.187)).toBeLessThan(1e-5); // Table A5.1 (rotation −10° from south = 170° from north)
    expect(out.transit).toBe('2003-10-17T11:46:04.959-07:00'); // physics.md §1 [SC] 11:46:04.96
    expect(out.sunset).toBe('2003-10-17T17:18:50.960-07:00'); // physics.md §1 [SC] 17:18:50.96 (local day)
    expect(out.spaAppendixA2.sunset.startsWith('2003-10-16T17:20:19')).toBe(true); // NREL tester 17:20:19 (previous evening)
    expect(r.stdout).not.toMatch(/NaN|Infinity/);
  });

  const spaExample = [
    '--lat',
    '39.742476',
    '--lon',
    '-105.1786',
    '--elev',
    '1830.14',
    '--pressure',
    '820',
    '--temp',
    '11',
    '--delta-t',
    '67',
  ];

  it('prints the unrefracted zenith and elevation beside the refracted ones (SPA worked example, ΔUT1 = 0)', () => {
    const r = cli('sun', ...spaExample, '--delta-ut1', '0', '--time', '2003-10-17T12:30:30-07:00');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.deltaUt1S).toBe(0);
    expect(Math.abs(out.elevationNoRefractionDeg - 39.872046)).toBeLessThan(1e-6); // Table A5.1 e0
    expect(Math.abs(out.refractionDeg - 0.016332)).toBeLessThan(1e-6); // Table A5.1 Δe
    expect(Math.abs(out.elevationDeg - 39.888378)).toBeLessThan(1e-6); // Table A5.1 e
    expect(Math.abs(out.zenithNoRefractionDeg - (90 - 39.872046))).toBeLessThan(1e-6); // derived: 90° − e0 (report eq. 44 without Δe)
    expect(Math.abs(out.zenithDeg - 50.11162)).toBeLessThan(1e-5); // Table A5.1 θ
  });

  it('takes ΔUT1 as UT1 − UTC: +0.5 s is the same sun as the instant 0.5 s later with ΔUT1 = 0', () => {
    // Derived from the report's time scales (eq. 4–5: JD from UT = UTC + ΔUT1, JDE = JD + ΔT/86400), with ΔT held.
    const shifted = JSON.parse(cli('sun', ...spaExample, '--delta-ut1', '0.5', '--time', '2003-10-17T12:30:30-07:00').stdout);
    const later = JSON.parse(cli('sun', ...spaExample, '--time', '2003-10-17T12:30:30.500-07:00').stdout);
    const base = JSON.parse(cli('sun', ...spaExample, '--time', '2003-10-17T12:30:30-07:00').stdout);
    expect(shifted.deltaUt1S).toBe(0.5);
    expect(shifted.zenithDeg).toBeCloseTo(later.zenithDeg, 6);
    expect(shifted.azimuthDeg).toBeCloseTo(later.azimuthDeg, 6);
    expect(shifted.elevationNoRefractionDeg).toBeCloseTo(later.elevationNoRefractionDeg, 6);
    // Half a second moves the sun measurably: the azimuth changes by about 0.5 s × 15″/s ≈ 0.002° at this hour.
    expect(Math.abs(shifted.azimuthDeg - base.azimuthDeg)).toBeGreaterThan(0.001);
    expect(Math.abs(shifted.azimuthDeg - base.azimuthDeg)).toBeLessThan(0.004);
  });

  for (const v of ['0.95', '-1', '67', 'abc']) {
    it(`refuses --delta-ut1 ${v}, saying what ΔUT1 is`, () => {
      const r = cli('sun', ...spaExample, '--delta-ut1', v, '--time', '2003-10-17T12:30:30-07:00');
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(/--delta-ut1: must be (a finite number )?in \[-0\.9, 0\.9\].*UT1 − UTC in seconds/);
    });
  }

  const bad: [string[], RegExp][] = [
    [['--lat', '91', '--lon', '0', '--time', '2020-01-01T00:00:00Z'], /--lat: must be in \[-90, 90\]/],
    [['--lat', 'NaN', '--lon', '0', '--time', '2020-01-01T00:00:00Z'], /--lat: must be a finite number/],
    [['--lat', '10', '--lon', 'Infinity', '--time', '2020-01-01T00:00:00Z'], /--lon: must be a finite number/],
    [['--lat', '10', '--lon', '0', '--time', '2020-01-01T12:00:00'], /--time: expected an ISO 8601 instant with an offset/],
    [['--lat', '10', '--lon', '0'], /--time: required/],
    [['--lat', '10', '--lon', '0', '--time', '2020-01-01T12:00:00Z', '--slope', '30'], /--surface-azimuth: required together with --slope/],
  ];
  for (const [args, message] of bad) {
    it(`rejects ${args.join(' ')}`, () => {
      const r = cli('sun', ...args);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(message);
    });
  }
});

describe('brightward landscape', () => {
  const facade = skyFile({
    sun: { azimuthDeg: 110, elevationDeg: 20, dniWm2: 700 },
    dhiWm2: 100,
    skyType: 12,
    reflectors: [
      { normalAzimuthDeg: 90, azimuthFromDeg: 230, azimuthToDeg: 300, elevationFromDeg: 0, elevationToDeg: 40, reflectance: 0.35 },
    ],
  });
  it('reports the global maximum, the trap with prominence and basin share, and the single-peak detector tilt', () => {
    const r = cli('landscape', '--sky', facade, '--step', '2', '--detector-tilt', '5');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.globalMax).toEqual({ tiltDeg: 70, azimuthDeg: 110, wm2: expect.any(Number) });
    expect(out.globalMax.wm2).toBeGreaterThan(700);
    expect(out.localMaxima).toHaveLength(2);
    for (const m of out.localMaxima) expect(Object.keys(m).sort()).toEqual(['azimuthDeg', 'basinShare', 'prominenceWm2', 'tiltDeg', 'wm2']);
    expect(out.localMaxima[0].basinShare + out.localMaxima[1].basinShare).toBeCloseTo(1, 5);
    expect(typeof out.minSinglePeakDetectorTiltDeg).toBe('number');
    expect(r.stdout).not.toMatch(/NaN|Infinity/);
  });

  it('gives null when no detector tilt up to the maximum makes one peak', () => {
    const lamps = skyFile({
      lamps: [
        { azimuthDeg: 0, elevationDeg: 20, irradianceWm2: 60 },
        { azimuthDeg: 180, elevationDeg: 20, irradianceWm2: 45 },
      ],
    });
    const out = JSON.parse(cli('landscape', '--sky', lamps, '--step', '3', '--max-detector-tilt', '10').stdout);
    expect(out.minSinglePeakDetectorTiltDeg).toBeNull();
  });

  const bad: [string[], RegExp][] = [
    [['--step', '0'], /--step: must be in \(0, 10\]/],
    [['--step', '10.5'], /--step: must be in \(0, 10\]/],
    [['--step', 'NaN'], /--step: must be a finite number/],
    [['--detector-tilt', '-1'], /--detector-tilt: must be in \[0, 45\]/],
  ];
  for (const [args, message] of bad) {
    it(`rejects ${args.join(' ')}`, () => {
      const r = cli('landscape', '--sky', facade, ...args);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
    });
  }

  it('names the bad field of a sky file, and refuses broken JSON and missing files', () => {
    const unsorted = cli(
      'landscape',
      '--sky',
      skyFile({
        skyType: 16,
        horizon: [
          [20, 5],
          [10, 5],
        ],
      }),
    );
    expect(unsorted.code).toBe(2);
    expect(unsorted.stderr).toMatch(/skyType: must be .*1…15/);
    expect(unsorted.stderr).toMatch(/horizon\[1\]\[0\]: must be sorted by azimuth/);
    const latitude = cli('landscape', '--sky', skyFile({ site: { latitudeDeg: -95, longitudeDeg: 0 }, time: '2020-06-01T12:00:00Z' }));
    expect(latitude.stderr).toMatch(/site\.latitudeDeg: must be in \[-90, 90\]/);
    const noOffset = cli('landscape', '--sky', skyFile({ site: { latitudeDeg: 45, longitudeDeg: 0 }, time: '2020-06-01T12:00:00' }));
    expect(noOffset.stderr).toMatch(/time: must be an ISO 8601 instant with an offset/);
    const broken = cli('landscape', '--sky', skyFile('{"skyType": '));
    expect(broken.code).toBe(2);
    expect(broken.stderr).toMatch(/--sky: not valid JSON/);
    const missing = cli('landscape', '--sky', join(dir, 'nope.json'));
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/--sky: cannot read/);
  });

  it('rejects an unknown command', () => {
    const r = cli('moon');
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/command: unknown command "moon"/);
  });
});

describe('brightward kpi', () => {
  it('prints the worked example of physics.md §7 (IEC 61724-1 yields; γ −0.40 %/K at 45 °C → PR_STC 0.8696)', () => {
    const r = cli('kpi', '--p0-kwp', '100', '--hi-kwh-m2', '6.5', '--eout-kwh', '520', '--gamma-pct-per-k', '-0.40', '--tmod-c', '45');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out)).toEqual(['yrH', 'yfH', 'pr', 'prTempCorrected']);
    expect(out.yrH).toBe(6.5);
    expect(out.yfH).toBe(5.2);
    expect(out.pr).toBe(0.8);
    expect(out.prTempCorrected).toBeCloseTo(0.8696, 4);
  });

  it('leaves the temperature-corrected PR null without γ and Tmod, and names bad options', () => {
    const plain = JSON.parse(cli('kpi', '--p0-kwp', '100', '--hi-kwh-m2', '6.5', '--eout-kwh', '520').stdout);
    expect(plain).toEqual({ yrH: 6.5, yfH: 5.2, pr: 0.8, prTempCorrected: null });
    const zero = cli('kpi', '--p0-kwp', '0', '--hi-kwh-m2', '6.5', '--eout-kwh', '520');
    expect(zero.code).toBe(2);
    expect(zero.stderr).toMatch(/--p0-kwp: must be in \(0, 1000000000\]; got 0/);
    const half = cli('kpi', '--p0-kwp', '100', '--hi-kwh-m2', '6.5', '--eout-kwh', '520', '--tmod-c', '45');
    expect(half.code).toBe(2);
    expect(half.stderr).toMatch(/--gamma-pct-per-k: required together with --tmod-c/);
    expect(cli('kpi', '--p0-kwp', '100', '--eout-kwh', '520').stderr).toMatch(/--hi-kwh-m2: required/);
  });
});

describe('the installed bin shim', () => {
  it('shared/cli/brightward.mjs runs the same command line through tsx', () => {
    const r = spawnSync(
      process.execPath,
      ['shared/cli/brightward.mjs', 'sun', '--lat', '0', '--lon', '0', '--time', '2020-03-20T12:00:00Z'],
      { cwd: root, encoding: 'utf8' },
    );
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.zenithDeg).toBeGreaterThan(0);
    expect(out.zenithDeg).toBeLessThan(3); // equinox noon on the equator: sun near the zenith (declination ≈ 0)
  });
});
