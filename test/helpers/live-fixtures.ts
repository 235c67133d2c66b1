/** Fixtures for tests of the live path without a database: unit directory entries and a settled telemetry report. */
import type { UnitDirectory, UnitInfo } from '../../server/services/unit-directory';
import type { Telemetry } from '../../shared/contracts/wire';

/** A plain, enabled unit with no holds (serial `<prefix>-<id>`). */
export const unitInfo = (id: number, ownerId: number, siteId: number, serialPrefix = 'T'): UnitInfo => ({
  id,
  serial: `${serialPrefix}-${id}`,
  siteId,
  ownerId,
  timeZone: 'UTC',
  disabled: false,
  onHold: false,
  holds: [],
  detectorTiltDeg: 20,
  weatherStation: false,
});

/** A directory over a fixed list, answering the lookups the live hub and the ingest make. */
export const directoryOf = (units: UnitInfo[]): UnitDirectory =>
  ({
    all: () => units,
    byUnitId: (id: number) => units.find((u) => u.id === id),
    get: (serial: string) => units.find((u) => u.serial === serial),
  }) as unknown as UnitDirectory;

/** A unit seeking at tilt 30°, azimuth 180° under 700 W/m², with the given fields changed. */
export const telemetryReport = (changes: Partial<Telemetry> = {}): Telemetry => ({
  v: 1,
  seq: 1,
  ts: '2026-06-01T12:00:00.000Z',
  mode: 'seeking',
  tiltMotorA: 0,
  azimuthMotorA: 0,
  firmware: '2.4.1',
  poaWm2: 700,
  dcPowerW: 250,
  tiltDeg: 30,
  azimuthDeg: 180,
  cmdTiltDeg: 30,
  cmdAzimuthDeg: 180,
  tiltPlusWm2: 710,
  tiltMinusWm2: 700,
  azimuthPlusWm2: 705,
  azimuthMinusWm2: 705,
  moduleTempC: 20,
  ...changes,
});
