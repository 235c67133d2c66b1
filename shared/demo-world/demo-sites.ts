/**
 * Sites, units and serials of the invented demo world: four sites of two owners, six units each. The seed writes them
 * to the database and the simulator runs the same units, so both read them from here (data only, no I/O).
 * Names are made up; coordinates are realistic.
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
  },
];

export const UNITS_PER_SITE = 6;

/** Detector tilt per unit index: most units well set up, a few too narrow for a cluttered sky (they can be trapped). */
export const DETECTOR_TILTS_DEG = [20, 20, 15, 20, 8, 20];

/** What every demo unit is: module rating, firmware and the travel of its two axes. */
export const DEMO_UNIT = {
  ratedPowerWp: 420,
  firmware: '2.4.1',
  tiltRangeDeg: [0, 85],
  azimuthRangeDeg: [0, 360],
} as const;

export const demoSerial = (siteCode: string, i: number) => `${siteCode}-${String(2401 + i)}`;

/** Every serial of the demo world, site by site. */
export const demoSerials = (): string[] =>
  DEMO_SITES.flatMap((s) => Array.from({ length: UNITS_PER_SITE }, (_, i) => demoSerial(s.code, i)));
