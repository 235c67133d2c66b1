/**
 * Sites, units and serials of the invented demo world: ten sites of six owners, 48 units. The seed writes them to the
 * database and the simulator runs the same units, so both read them from here (data only, no I/O). Names are made up;
 * coordinates are realistic.
 *
 * Four sites in Western Europe carry the scenes (glass facade, broken cloud, courtyard, indoor atrium); six open sites
 * spread over longitudes and both hemispheres keep the sun at least 10° high at some outdoor site at every hour of the
 * year (test/shared/demo-world-daylight.test.ts): three near the equator about 120° of longitude apart, and three at
 * mid-latitudes of both hemispheres.
 */

export const DEMO_SITES = [
  {
    owner: 'Quillmoor Energy Cooperative',
    name: 'Harbourside Library Roof',
    code: 'QHL',
    latitude_deg: 53.5413,
    longitude_deg: 9.9937,
    elevation_m: 24,
    time_zone: 'Europe/Berlin',
    albedo: 0.3,
    indoor: false,
    units: 6,
  },
  {
    owner: 'Quillmoor Energy Cooperative',
    name: 'Eastfield Depot Yard',
    code: 'QED',
    latitude_deg: 53.5738,
    longitude_deg: 10.0806,
    elevation_m: 11,
    time_zone: 'Europe/Berlin',
    albedo: 0.18,
    indoor: false,
    units: 6,
  },
  {
    owner: 'Fenwick Lane Schools Trust',
    name: 'Fenwick Lane School Courtyard',
    code: 'FSC',
    latitude_deg: 51.459,
    longitude_deg: -2.587,
    elevation_m: 42,
    time_zone: 'Europe/London',
    albedo: 0.2,
    indoor: false,
    units: 6,
  },
  {
    owner: 'Fenwick Lane Schools Trust',
    name: 'Glasshouse Atrium',
    code: 'FGA',
    latitude_deg: 51.4545,
    longitude_deg: -2.5979,
    elevation_m: 15,
    time_zone: 'Europe/London',
    albedo: 0.5,
    indoor: true,
    units: 6,
  },
  {
    owner: 'Tindara Water Cooperative',
    name: 'Punta Salinas Pumping Station',
    code: 'TPS',
    latitude_deg: -2.2138,
    longitude_deg: -80.9183,
    elevation_m: 12,
    time_zone: 'America/Guayaquil',
    albedo: 0.25,
    indoor: false,
    units: 4,
  },
  {
    owner: 'Tindara Water Cooperative',
    name: 'Mesa Seca Reservoir',
    code: 'TMS',
    latitude_deg: -33.6184,
    longitude_deg: -70.5726,
    elevation_m: 690,
    time_zone: 'America/Santiago',
    albedo: 0.22,
    indoor: false,
    units: 3,
  },
  {
    owner: 'Nyasoro Clinics Trust',
    name: 'Kerio Ridge Clinic Roof',
    code: 'NKR',
    latitude_deg: -1.1921,
    longitude_deg: 36.9342,
    elevation_m: 1610,
    time_zone: 'Africa/Nairobi',
    albedo: 0.17,
    indoor: false,
    units: 5,
  },
  {
    owner: 'Wattlebank Islands Energy Co-op',
    name: 'Redgum Flat Depot',
    code: 'WRF',
    latitude_deg: -34.7826,
    longitude_deg: 138.6511,
    elevation_m: 45,
    time_zone: 'Australia/Adelaide',
    albedo: 0.2,
    indoor: false,
    units: 4,
  },
  {
    owner: 'Wattlebank Islands Energy Co-op',
    name: 'Kolova Harbour Market Roof',
    code: 'WKM',
    latitude_deg: -9.4312,
    longitude_deg: 159.9617,
    elevation_m: 8,
    time_zone: 'Pacific/Guadalcanal',
    albedo: 0.15,
    indoor: false,
    units: 5,
  },
  {
    owner: 'Cedar Flats Irrigation District',
    name: 'Cedar Flats Pump Yard',
    code: 'CPY',
    latitude_deg: 39.7813,
    longitude_deg: -104.6521,
    elevation_m: 1620,
    time_zone: 'America/Denver',
    albedo: 0.2,
    indoor: false,
    units: 3,
  },
];

/** The most units the demo world may have in all: the demo fleet runs in real time beside the server on a small machine. */
export const MAX_DEMO_UNITS = 48;

/**
 * Detector tilt per unit index: most units well set up, a few too narrow for a cluttered sky (they can be trapped).
 * Sites with a cluttered sky have at least five units, so they include the narrow unit at index 4.
 */
export const DETECTOR_TILTS_DEG = [20, 20, 15, 20, 8, 20];

/** Index of the unit whose narrow detector tilt makes it prone to traps under a cluttered sky. */
export const TRAP_PRONE_UNIT_INDEX = 4;

/** What every demo unit is: module rating, firmware and the travel of its two axes. */
export const DEMO_UNIT = {
  ratedPowerWp: 420,
  firmware: '2.4.1',
  tiltRangeDeg: [0, 85],
  azimuthRangeDeg: [0, 360],
} as const;

export const demoSerial = (siteCode: string, i: number) => `${siteCode}-${String(2401 + i)}`;

/** The serials of one demo site's units, in unit-index order. */
export const demoSiteSerials = (site: { code: string; units: number }): string[] =>
  Array.from({ length: site.units }, (_, i) => demoSerial(site.code, i));

/** Every serial of the demo world, site by site. */
export const demoSerials = (): string[] => DEMO_SITES.flatMap(demoSiteSerials);
