/**
 * The demo fleet: the units of the invented demo world, each site under a fitting scenario. Sites with a cluttered sky
 * (facades, broken cloud, courtyard, lamps) have a unit with index 4, whose narrow detector tilt (8°) makes it the one
 * prone to traps; the open clear, gusty and overcast sites have fewer units and no such unit.
 */
import { DEMO_SITES, DEMO_UNIT, DETECTOR_TILTS_DEG, demoSiteSerials } from '../shared/demo-world';
import type { FleetSiteSpec } from './fleet';
import type { SiteInfo } from './scenarios';

export const DEMO_SCENARIO_BY_SITE: Record<string, string> = {
  QHL: 'glass-facade',
  QED: 'broken-cloud',
  FSC: 'urban-canyon',
  FGA: 'atrium-lamps',
  // Coastal desert under its dry-season cloud deck.
  TPS: 'overcast',
  TMS: 'clear-day',
  // Highland equatorial afternoons: cumulus building and breaking.
  NKR: 'broken-cloud',
  WRF: 'clear-day',
  // Tropical island: showers and clear spells.
  WKM: 'broken-cloud',
  // High plains below the mountains: downslope wind storms.
  CPY: 'gusty',
};

/** The scenario a demo site runs under. */
export function demoScenarioOf(code: string): string {
  const scenario = DEMO_SCENARIO_BY_SITE[code];
  if (!scenario) throw new RangeError(`demo site ${code} has no scenario in DEMO_SCENARIO_BY_SITE`);
  return scenario;
}

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
    scenario: demoScenarioOf(s.code),
    units: demoSiteSerials(s).map((serial, i) => ({
      serial,
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
