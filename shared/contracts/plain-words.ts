/**
 * The words people read for the product's machine names: unit modes, commands, alarm kinds, detectors, unit settings
 * and survey fields. The API and the wire keep their machine keys; every text for people (server messages and the
 * dashboard alike) goes through these maps, so one thing has one name everywhere. No zod here: the dashboard imports it.
 */
import type { AlarmKind } from './alarms';
import type { CommandKind, UnitMode } from './wire-format';

/** A unit mode as a label (chips, tables) and as words inside a sentence ("tilt 40°, tracking"). */
export const UNIT_MODE_WORDS: Record<UnitMode, { label: string; phrase: string }> = {
  seeking: { label: 'Tracking', phrase: 'tracking' },
  settled: { label: 'Settled', phrase: 'settled' },
  scanning: { label: 'Scanning', phrase: 'scanning the sky' },
  stowed: { label: 'Stowed', phrase: 'stowed' },
  held: { label: 'Maintenance hold', phrase: 'on maintenance hold' },
  fault: { label: 'Fault', phrase: 'reporting a fault' },
};

/** The sentence words of a mode; an unknown mode is named as an unknown mode, never by its key alone. */
export function modePhrase(mode: string | null | undefined): string {
  return (UNIT_MODE_WORDS as Partial<Record<string, { phrase: string }>>)[mode ?? '']?.phrase ?? 'in an unknown mode';
}

/** What a unit's own events are called on the trace explorer's time line. */
export const EVENT_WORDS: Record<string, string> = {
  'mode-change': 'Mode changed',
  fault: 'Fault',
  'fault-cleared': 'Fault cleared',
  'scan-samples': 'Scan samples',
  'scan-complete': 'Scan finished',
  boot: 'Unit started',
};

/** The name of a unit event; one newer than this map is "Unit event". */
export function eventWords(kind: string): string {
  return EVENT_WORDS[kind] ?? 'Unit event';
}

/** What each command is called in lists and the history (the buttons say the same). */
export const COMMAND_WORDS: Record<CommandKind, string> = {
  scan: 'Scan the sky',
  goto: 'Go to orientation',
  stow: 'Stow',
  'release-stow': 'Release stow',
  hold: 'Put on maintenance hold',
  'release-hold': 'Release hold',
  configure: 'New settings',
};

export function commandWords(kind: string): string {
  return (COMMAND_WORDS as Partial<Record<string, string>>)[kind] ?? 'Other command';
}

/** The names of alarm kinds, and of the wind-stow event shown beside them. */
export const ALARM_KIND_WORDS: Record<AlarmKind | 'wind-stow', string> = {
  trap: 'Stuck on a lesser peak',
  stall: 'Actuator stall',
  drift: 'Detector drift',
  hunting: 'Hunting',
  comms: 'Unit silent',
  'site-comms': 'Site silent',
  soiling: 'Soiling',
  'not-stowed': 'Did not stow',
  'wind-stow': 'Wind stow',
};

/** Plain name of an alarm kind; a kind newer than this map is shown as sent, with dashes as spaces. */
export function alarmKindWords(kind: string): string {
  return (ALARM_KIND_WORDS as Partial<Record<string, string>>)[kind] ?? kind.replace(/-/g, ' ');
}

/**
 * The four detectors of a unit's two pairs (the `…Wm2` readings of a report), as people name them, the same as the
 * trace explorer's legend (shared/contracts/traces.ts): "+" looks at a steeper tilt or further clockwise than the panel.
 */
export const DETECTOR_WORDS = {
  tiltPlus: 'tilt detector +',
  tiltMinus: 'tilt detector −',
  azimuthPlus: 'azimuth detector +',
  azimuthMinus: 'azimuth detector −',
} as const;
export type DetectorName = keyof typeof DETECTOR_WORDS;

export function detectorWords(name: string): string {
  return (DETECTOR_WORDS as Partial<Record<string, string>>)[name] ?? 'one of the detectors';
}

/** A unit's settings (`configure`) as people name them, with the unit each is given in. */
export const SETTING_WORDS = {
  detectorTiltDeg: { label: 'detector tilt', unit: '°' },
  gain: { label: 'gain', unit: '' },
  deadbandWm2: { label: 'deadband', unit: 'W/m²' },
  reportIntervalS: { label: 'report interval', unit: 's' },
} as const;

/** A facade's fields as the survey form labels them. */
const REFLECTOR_FIELDS: Record<string, string> = {
  normalAzimuthDeg: 'faces azimuth',
  normalElevationDeg: 'leans',
  azimuthFromDeg: 'seen from azimuth',
  azimuthToDeg: 'to azimuth',
  elevationFromDeg: 'from elevation',
  elevationToDeg: 'to elevation',
  reflectance: 'reflectance',
};
const LAMP_FIELDS: Record<string, string> = { azimuthDeg: 'azimuth', elevationDeg: 'elevation', irradianceWm2: 'irradiance' };

/**
 * The name of a survey field as the survey form shows it, from the path the API keys its messages by, counted from 1:
 * `horizon.3` → "Horizon point 4", `horizon.3.0` → "Horizon point 4, azimuth", `reflectors.0.reflectance` →
 * "Facade 1, reflectance", `lamps.2` → "Lamp 3". A path this does not know is given as "The survey".
 */
export function surveyFieldWords(path: string): string {
  const [list, index, field] = path.split('.');
  const n = Number(index);
  if (list === 'skyType') return 'Sky type';
  if ((list === 'horizon' || list === 'reflectors' || list === 'lamps') && index === undefined)
    return { horizon: 'Horizon profile', reflectors: 'Facades', lamps: 'Lamps' }[list];
  if (!Number.isInteger(n) || n < 0) return 'The survey';
  if (list === 'horizon') return `Horizon point ${n + 1}${field === '0' ? ', azimuth' : field === '1' ? ', elevation' : ''}`;
  if (list === 'reflectors') return `Facade ${n + 1}${field ? `, ${REFLECTOR_FIELDS[field] ?? 'a field'}` : ''}`;
  if (list === 'lamps') return `Lamp ${n + 1}${field ? `, ${LAMP_FIELDS[field] ?? 'a field'}` : ''}`;
  return 'The survey';
}

/** Unit suffixes of the API's field names, and how a reader writes the unit. */
const FIELD_UNITS: [suffix: string, unit: string][] = [
  ['Wm2', 'W/m²'],
  ['Deg', '°'],
  ['Wp', 'Wp'],
  ['Ms', 'm/s'],
  ['Pct', '%'],
  ['Min', 'min'],
  ['Hours', 'h'],
  ['S', 's'],
  ['M', 'm'],
  ['A', 'A'],
  ['W', 'W'],
  ['C', '°C'],
];

/**
 * A field name of the API in words, for lists of changes (the audit log): the setting's own name when it is one, else
 * the camelCase split into words with its unit in brackets: `tiltMinDeg` → "tilt min [°]", `planXM` → "plan x [m]".
 */
export function fieldWords(key: string): string {
  const setting = (SETTING_WORDS as Partial<Record<string, { label: string; unit: string }>>)[key];
  if (setting) return setting.unit ? `${setting.label} [${setting.unit}]` : setting.label;
  let base = key;
  let unit = '';
  for (const [suffix, u] of FIELD_UNITS) {
    if (key.length > suffix.length && key.endsWith(suffix)) {
      base = key.slice(0, -suffix.length);
      unit = u;
      break;
    }
  }
  const words = base
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/([A-Z])([A-Z][a-z])/g, '$1 $2')
    .toLowerCase();
  return unit ? `${words} [${unit}]` : words;
}
