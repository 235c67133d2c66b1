/**
 * The demo fleet: the 24 units of the invented demo world, each site under a fitting scenario. Unit index 4 of each site
 * has the narrow detector tilt (8°) and is the one prone to traps.
 */
import { DEMO_SITES, DEMO_UNIT, DETECTOR_TILTS_DEG, UNITS_PER_SITE, demoSerial } from '../shared/demo-world';
import type { FleetSiteSpec } from './fleet';
import type { SiteInfo } from './scenarios';

export const DEMO_SCENARIO_BY_SITE: Record<string, string> = {
  QHL: 'glass-facade',
  QED: 'broken-cloud',
  FSC: 'urban-canyon',
  FGA: 'atrium-lamps',
};

export function demoSiteInfo(code: string): SiteInfo {
  const s = DEMO_SITES.find((x) => x.code === code);
  if (!s) throw new RangeError(`no demo site ${code}`);
  return {
    name: s.name,
    code: s.code,
    latitudeDeg: s.latitude_deg,
    longitudeDeg: s.longitude_deg,
    elevationM: s.elevation_m,
    albedo: s.albedo,
    indoor: s.indoor,
  };
}

export function demoFleetSites(reportIntervalS = 5): FleetSiteSpec[] {
  return DEMO_SITES.map((s) => ({
    site: demoSiteInfo(s.code),
    scenario: DEMO_SCENARIO_BY_SITE[s.code]!,
    units: Array.from({ length: UNITS_PER_SITE }, (_, i) => ({
      serial: demoSerial(s.code, i),
      siteCode: s.code,
      firmware: DEMO_UNIT.firmware,
      ratedPowerWp: DEMO_UNIT.ratedPowerWp,
      wear: i === 5 ? 0.3 : 0.02 * i,
      controller: { detectorTiltDeg: DETECTOR_TILTS_DEG[i]!, reportIntervalS },
      weatherStation: i === 0 && !s.indoor,
      start: { tiltDeg: 0, azimuthDeg: 180 },
    })),
  }));
}
