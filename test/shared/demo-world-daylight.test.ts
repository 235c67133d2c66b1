/**
 * The demo world has daylight somewhere at every hour: whenever `npm start` runs, some outdoor demo site has the sun at
 * least 10° high, so the fleet board never shows every unit dark. Sun positions from the shared solar-position function
 * (NREL SPA, Reda & Andreas 2008); apparent elevation (with refraction at the site's standard-atmosphere pressure).
 */
import { describe, expect, it } from 'vitest';
import { DEMO_SITES } from '../../shared/demo-world';
import { solarPosition } from '../../shared/solar-position';

const MIN_ELEVATION_DEG = 10;
const outdoor = DEMO_SITES.filter((s) => !s.indoor);

/** The highest sun over the outdoor demo sites at an instant, and where. */
function highestSun(unixMs: number): { elevationDeg: number; code: string } {
  let best = { elevationDeg: -90, code: '' };
  for (const s of outdoor) {
    const { elevationDeg } = solarPosition(
      { latitudeDeg: s.latitude_deg, longitudeDeg: s.longitude_deg, elevationM: s.elevation_m },
      unixMs,
    );
    if (elevationDeg > best.elevationDeg) best = { elevationDeg, code: s.code };
  }
  return best;
}

/** The instant (on the hour and at :30 UTC) between from and to where the highest sun is lowest. */
function worstInstant(fromMs: number, toMs: number) {
  let worst = { elevationDeg: 90, code: '', at: '' };
  for (let t = fromMs; t < toMs; t += 30 * 60_000) {
    const h = highestSun(t);
    if (h.elevationDeg < worst.elevationDeg) worst = { ...h, at: new Date(t).toISOString() };
  }
  return worst;
}

const describeWorst = (w: { elevationDeg: number; code: string; at: string }) =>
  `lowest highest sun ${w.elevationDeg.toFixed(2)}° at ${w.at} (over ${w.code})`;

describe('demo world daylight', () => {
  // 17,520 instants × the outdoor sites, each a full SPA run: a few seconds, more on a busy machine.
  it('the sun is at least 10° high at some outdoor site at every hour and half hour of 2027', { timeout: 90_000 }, () => {
    const worst = worstInstant(Date.UTC(2027, 0, 1), Date.UTC(2028, 0, 1));
    console.info(`demo world, 2027: ${describeWorst(worst)}`);
    expect(worst.elevationDeg, describeWorst(worst)).toBeGreaterThanOrEqual(MIN_ELEVATION_DEG);
  });

  it('and on the leap day 29 February 2028', () => {
    const worst = worstInstant(Date.UTC(2028, 1, 29), Date.UTC(2028, 2, 1));
    expect(worst.elevationDeg, describeWorst(worst)).toBeGreaterThanOrEqual(MIN_ELEVATION_DEG);
  });

  it('the check can fail: the European sites alone leave December mornings dark', () => {
    // Without the sites elsewhere the December sun at 51–54° N never reaches 10° before about 10:00 UTC.
    const europe = outdoor.filter((s) => s.time_zone.startsWith('Europe/'));
    expect(europe.length).toBeGreaterThan(0);
    const at = Date.UTC(2027, 11, 21, 8, 0);
    const highest = Math.max(
      ...europe.map(
        (s) => solarPosition({ latitudeDeg: s.latitude_deg, longitudeDeg: s.longitude_deg, elevationM: s.elevation_m }, at).elevationDeg,
      ),
    );
    expect(highest).toBeLessThan(MIN_ELEVATION_DEG);
    expect(highestSun(at).elevationDeg).toBeGreaterThanOrEqual(MIN_ELEVATION_DEG);
  });
});
