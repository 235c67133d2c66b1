/**
 * The demo world hangs together: what the seed writes (owners, users, surveys) and what the simulator runs (scenarios,
 * units) cover the same sites, every site has a real time zone that fits its longitude, and serials are unique.
 */
import { describe, expect, it } from 'vitest';
import { surveySchema } from '../../shared/contracts/survey';
import { DEMO_SITES, DETECTOR_TILTS_DEG, MAX_DEMO_UNITS, TRAP_PRONE_UNIT_INDEX, demoSerials } from '../../shared/demo-world';
import { DEMO_OWNERS, DEMO_SURVEYS, DEMO_USERS } from '../../seeds/demo-world';
import { DEMO_SCENARIO_BY_SITE, demoFleetSites } from '../../simulator/demo-fleet';
import { SCENARIOS } from '../../simulator/scenarios';

/** UTC offset [h] of a time zone at an instant, from the platform's time-zone database (e.g. "GMT+09:30" → 9.5). */
function utcOffsetHours(timeZone: string, unixMs: number): number {
  const name = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'longOffset' })
    .formatToParts(unixMs)
    .find((p) => p.type === 'timeZoneName')!.value;
  const m = /^GMT(?:([+-])(\d{2}):(\d{2}))?$/.exec(name);
  if (!m) throw new Error(`unexpected offset name ${name}`);
  return m[1] ? (m[1] === '-' ? -1 : 1) * (Number(m[2]) + Number(m[3]) / 60) : 0;
}

/** Great-circle distance [km] on a sphere of the Earth's mean radius. */
function distanceKm(a: { latitude_deg: number; longitude_deg: number }, b: { latitude_deg: number; longitude_deg: number }): number {
  const r = Math.PI / 180;
  const h =
    Math.sin(((b.latitude_deg - a.latitude_deg) * r) / 2) ** 2 +
    Math.cos(a.latitude_deg * r) * Math.cos(b.latitude_deg * r) * Math.sin(((b.longitude_deg - a.longitude_deg) * r) / 2) ** 2;
  return 2 * 6371 * Math.asin(Math.sqrt(h));
}

/** Scenarios whose sky has more than one bright region, where a narrow detector tilt can settle on the wrong one. */
const CLUTTERED = new Set(['glass-facade', 'broken-cloud', 'urban-canyon', 'atrium-lamps']);

describe('demo world sites', () => {
  it('ten sites with unique codes of three capital letters, at most 48 units in all', () => {
    expect(DEMO_SITES).toHaveLength(10);
    expect(new Set(DEMO_SITES.map((s) => s.code)).size).toBe(DEMO_SITES.length);
    for (const s of DEMO_SITES) expect(s.code).toMatch(/^[A-Z]{3}$/);
    const total = DEMO_SITES.reduce((n, s) => n + s.units, 0);
    expect(total).toBe(48);
    expect(total).toBeLessThanOrEqual(MAX_DEMO_UNITS);
  });

  it('serials are unique, follow <CODE>-2401…, and the simulator runs exactly the seeded units', () => {
    const serials = demoSerials();
    expect(serials).toHaveLength(48);
    expect(new Set(serials).size).toBe(serials.length);
    expect(serials.slice(0, 2)).toEqual(['QHL-2401', 'QHL-2402']);
    expect(serials).toContain('CPY-2403');
    expect(serials).not.toContain('CPY-2404');
    expect(demoFleetSites().flatMap((s) => s.units.map((u) => u.serial))).toEqual(serials);
  });

  it('every site has a valid IANA time zone whose offset is within 2.5 h of its longitude’s solar time', () => {
    // The zone names the site forms and the API accept (server/routes/validation.ts): the platform's own list.
    const accepted = new Set(Intl.supportedValuesOf('timeZone'));
    for (const s of DEMO_SITES) {
      expect(accepted.has(s.time_zone), `${s.code} ${s.time_zone}`).toBe(true);
      expect(new Intl.DateTimeFormat('en-US', { timeZone: s.time_zone }).resolvedOptions().timeZone, s.code).toBe(s.time_zone);
      for (const at of [Date.UTC(2027, 0, 15), Date.UTC(2027, 6, 15)]) {
        const off = utcOffsetHours(s.time_zone, at);
        expect(Math.abs(off - s.longitude_deg / 15), `${s.code} ${s.time_zone} UTC${off}`).toBeLessThanOrEqual(2.5);
      }
    }
    expect(utcOffsetHours('Australia/Adelaide', Date.UTC(2027, 6, 15))).toBe(9.5);
  });

  it('sites share a time zone only when they are in the same town; the six sites beyond Europe each have their own', () => {
    for (const a of DEMO_SITES)
      for (const b of DEMO_SITES)
        if (a !== b && a.time_zone === b.time_zone) expect(distanceKm(a, b), `${a.code} and ${b.code}`).toBeLessThan(20);
    const beyondEurope = DEMO_SITES.filter((s) => !s.time_zone.startsWith('Europe/'));
    expect(beyondEurope).toHaveLength(6);
    expect(new Set(beyondEurope.map((s) => s.time_zone)).size).toBe(6);
  });

  it('sites lie in both hemispheres and spread over longitude', () => {
    const outdoor = DEMO_SITES.filter((s) => !s.indoor);
    expect(outdoor.some((s) => s.latitude_deg > 23.5)).toBe(true);
    expect(outdoor.some((s) => s.latitude_deg < -23.5)).toBe(true);
    const nearEquator = outdoor.filter((s) => Math.abs(s.latitude_deg) < 15).map((s) => s.longitude_deg);
    expect(nearEquator).toHaveLength(3);
    // Largest gap between neighbouring equatorial sites around the globe: about 120° each.
    const sorted = [...nearEquator].sort((x, y) => x - y);
    const gaps = sorted.map((lon, i) => (i === 0 ? lon + 360 - sorted[sorted.length - 1]! : lon - sorted[i - 1]!));
    expect(Math.max(...gaps)).toBeLessThan(145);
  });
});

describe('demo world scenarios, surveys, owners and users', () => {
  it('every site runs an existing scenario, and only the indoor site runs the lamp scenario', () => {
    expect(Object.keys(DEMO_SCENARIO_BY_SITE).sort()).toEqual(DEMO_SITES.map((s) => s.code).sort());
    for (const s of DEMO_SITES) {
      const scenario = DEMO_SCENARIO_BY_SITE[s.code]!;
      expect(SCENARIOS[scenario], `${s.code}: ${scenario}`).toBeDefined();
      expect(scenario === 'atrium-lamps', s.code).toBe(s.indoor);
    }
  });

  it('a weather station on unit 0 of every outdoor site and nowhere else', () => {
    for (const site of demoFleetSites()) {
      const stations = site.units.filter((u) => u.weatherStation).map((u) => u.serial);
      expect(stations, site.site.code).toEqual(site.site.indoor ? [] : [site.units[0]!.serial]);
    }
  });

  it('sites with a cluttered sky have the narrow-detector unit that can be trapped', () => {
    expect(DETECTOR_TILTS_DEG[TRAP_PRONE_UNIT_INDEX]).toBe(Math.min(...DETECTOR_TILTS_DEG));
    for (const site of demoFleetSites()) {
      if (!CLUTTERED.has(site.scenario)) continue;
      expect(site.units[TRAP_PRONE_UNIT_INDEX]?.controller?.detectorTiltDeg, site.site.code).toBe(8);
    }
  });

  it('every site has a survey the API accepts, open for the open scenarios', () => {
    expect(Object.keys(DEMO_SURVEYS).sort()).toEqual(DEMO_SITES.map((s) => s.code).sort());
    for (const s of DEMO_SITES) {
      const survey = DEMO_SURVEYS[s.code]!;
      expect(surveySchema.safeParse(survey).success, s.code).toBe(true);
      if (['clear-day', 'overcast', 'gusty', 'broken-cloud'].includes(DEMO_SCENARIO_BY_SITE[s.code]!)) {
        expect(survey.horizon, s.code).toEqual([]);
        expect(survey.reflectors, s.code).toEqual([]);
      }
    }
  });

  it('every owner has sites and an owner user; every site belongs to a listed owner', () => {
    const owners = DEMO_OWNERS.map((o) => o.name);
    expect(owners).toHaveLength(6);
    expect(new Set(owners).size).toBe(6);
    for (const s of DEMO_SITES) expect(owners, s.code).toContain(s.owner);
    for (const o of DEMO_OWNERS) {
      expect(o.contact_email).toMatch(/^[a-z]+@[a-z]+\.example$/);
      expect(
        DEMO_SITES.some((s) => s.owner === o.name),
        o.name,
      ).toBe(true);
      expect(
        DEMO_USERS.filter((u) => u.role === 'owner' && u.owner === o.name),
        o.name,
      ).toHaveLength(1);
    }
    expect(new Set(DEMO_USERS.map((u) => u.email)).size).toBe(DEMO_USERS.length);
  });
});
