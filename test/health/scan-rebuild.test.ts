import { describe, expect, it } from 'vitest';
import { buildSky, irradianceAt } from '../../shared/landscape';
import { angleBetweenDeg, compareScan, rebuildScan, type ScanSample } from '../../server/health/scan-rebuild';

/** The raster a unit sweeps: tilt rows 10, 30, 50, 70°, azimuth every 30°, serpentine. */
function scan(e: (tiltDeg: number, azimuthDeg: number) => number): ScanSample[] {
  const out: ScanSample[] = [];
  [10, 30, 50, 70].forEach((t, row) => {
    const azs = Array.from({ length: 13 }, (_, i) => i * 30);
    for (const a of row % 2 ? azs.reverse() : azs) out.push([t, a, Math.round(e(t, a) * 10) / 10]);
  });
  return out;
}

describe('scan rebuild', () => {
  // Clear sky with the sun at azimuth 125°, elevation 48°: the brightest orientation faces the sun, tilt 42°, azimuth 125°.
  const sky = buildSky({ sun: { azimuthDeg: 125, elevationDeg: 48, dniWm2: 800 }, dhiWm2: 100, skyType: 'isotropic', albedo: 0.2 });
  const samples = scan((t, a) => irradianceAt(sky, t, a));

  it('finds the global maximum of a landscape with a known peak, refined between raster points', () => {
    const l = rebuildScan(samples);
    expect(l.samples).toBe(52);
    expect(l.tiltsDeg).toEqual([10, 30, 50, 70]);
    expect(l.sampleMax).toMatchObject({ tiltDeg: 50, azimuthDeg: 120 });
    expect(angleBetweenDeg(l.globalMax, { tiltDeg: 42, azimuthDeg: 125 })).toBeLessThan(6);
    expect(angleBetweenDeg(l.sampleMax, { tiltDeg: 42, azimuthDeg: 125 })).toBeGreaterThan(
      angleBetweenDeg(l.globalMax, { tiltDeg: 42, azimuthDeg: 125 }),
    );
    expect(l.globalMax.wm2).toBeGreaterThanOrEqual(l.sampleMax.wm2);
    expect(l.globalMax.wm2).toBeLessThanOrEqual(irradianceAt(sky, 42, 125) + 1);
    expect(l.localMaxima[0]).toMatchObject({ tiltDeg: 50, azimuthDeg: 120 });
  });

  it('lists a second, dimmer local maximum and offers go-to with the gain over what the unit had', () => {
    const withReflection = samples.map(([t, a, e]) => [t, a, t === 70 && a === 300 ? 900 : e] as ScanSample);
    const r = compareScan(withReflection, 400, { globalMax: { tiltDeg: 42, azimuthDeg: 125, wm2: 900 } });
    expect(r.landscape.localMaxima.map((p) => [p.tiltDeg, p.azimuthDeg])).toContainEqual([70, 300]);
    expect(r.goto).toEqual({ kind: 'goto', tiltDeg: 70, azimuthDeg: 300 });
    expect(r.expectedGainWm2).toBe(500);
    expect(r.expectedGainPct).toBe(125);
    expect(r.model!.angleApartDeg).toBeGreaterThan(60);
    const clean = compareScan(samples, 400, { globalMax: { tiltDeg: 42, azimuthDeg: 125, wm2: irradianceAt(sky, 42, 125) } });
    expect(clean.model!.angleApartDeg).toBeLessThan(6);
    expect(Math.abs(clean.model!.measuredVsModelPct)).toBeLessThan(2);
  });

  it('refuses an empty scan', () => {
    expect(() => rebuildScan([])).toThrow(RangeError);
  });
});
