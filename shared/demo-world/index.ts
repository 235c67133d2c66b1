/** The invented demo world's sites, units and surveyed geometry: one home for the seed and the simulator. */
export {
  DEMO_SITES,
  DEMO_UNIT,
  DETECTOR_TILTS_DEG,
  MAX_DEMO_UNITS,
  TRAP_PRONE_UNIT_INDEX,
  demoSerial,
  demoSerials,
  demoSiteSerials,
} from './demo-sites';
export {
  ATRIUM_LAMPS,
  ATRIUM_WALL_DEG,
  CITY_HORIZON,
  COURTYARD_HORIZON,
  FACADES,
  type HorizonPoints,
  type ScheduledLamp,
} from './demo-geometry';
