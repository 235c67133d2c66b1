import { describe, expect, it } from 'vitest';
import { ALARM_KINDS } from '../../shared/contracts/alarms';
import {
  ALARM_KIND_WORDS,
  COMMAND_WORDS,
  DETECTOR_WORDS,
  EVENT_WORDS,
  fieldWords,
  modePhrase,
  SETTING_WORDS,
  surveyFieldWords,
  UNIT_MODE_WORDS,
} from '../../shared/contracts/plain-words';
import { TRACE_QUANTITY_INFO } from '../../shared/contracts/traces';
import { unitConfigSchema } from '../../shared/contracts/wire';
import { COMMAND_KINDS, EVENT_KINDS, UNIT_MODES } from '../../shared/contracts/wire-format';
import { rawWordsIn } from '../helpers/raw-words';

describe('plain words', () => {
  it('gives every mode, command, alarm kind, event and setting one name of its own, none of them a machine name', () => {
    const groups: [string, readonly string[], Record<string, unknown>][] = [
      ['unit modes', UNIT_MODES, UNIT_MODE_WORDS],
      ['commands', COMMAND_KINDS, COMMAND_WORDS],
      ['alarm kinds', ALARM_KINDS, ALARM_KIND_WORDS],
      ['unit events', EVENT_KINDS, EVENT_WORDS],
      ['unit settings', Object.keys(unitConfigSchema.shape), SETTING_WORDS],
    ];
    for (const [what, keys, words] of groups) {
      expect(
        Object.keys(words)
          .filter((k) => k !== 'wind-stow')
          .sort(),
        what,
      ).toEqual([...keys].sort());
      const names = keys.map((k) => {
        const w = words[k] as string | { label: string };
        return typeof w === 'string' ? w : w.label;
      });
      expect(new Set(names).size, `${what}: one name each`).toBe(keys.length);
      expect(rawWordsIn(names.join(' · ')), what).toEqual([]);
    }
  });

  it('names the detectors as the trace explorer’s legend does', () => {
    for (const [key, words] of Object.entries(DETECTOR_WORDS))
      expect(TRACE_QUANTITY_INFO[`${key}Wm2` as keyof typeof TRACE_QUANTITY_INFO].label.toLowerCase()).toBe(words);
  });

  it('words a mode inside a sentence, and an unknown one without its key', () => {
    expect(modePhrase('seeking')).toBe('tracking');
    expect(modePhrase('held')).toBe('on maintenance hold');
    expect(modePhrase('dancing')).toBe('in an unknown mode');
  });

  it('names survey fields from the 0-counted paths of the API, counted from 1 as the form shows them', () => {
    expect(surveyFieldWords('horizon.3')).toBe('Horizon point 4');
    expect(surveyFieldWords('horizon.0.1')).toBe('Horizon point 1, elevation');
    expect(surveyFieldWords('reflectors.0.reflectance')).toBe('Facade 1, reflectance');
    expect(surveyFieldWords('reflectors.2.normalAzimuthDeg')).toBe('Facade 3, faces azimuth');
    expect(surveyFieldWords('lamps.1.irradianceWm2')).toBe('Lamp 2, irradiance');
    expect(surveyFieldWords('skyType')).toBe('Sky type');
    expect(surveyFieldWords('horizon')).toBe('Horizon profile');
    expect(surveyFieldWords('colour')).toBe('The survey');
  });

  it('splits any other field name into words with its unit', () => {
    expect(fieldWords('tiltMinDeg')).toBe('tilt min [°]');
    expect(fieldWords('stowGustMs')).toBe('stow gust [m/s]');
    expect(fieldWords('detectorTiltDeg')).toBe('detector tilt [°]');
    expect(fieldWords('planXM')).toBe('plan x [m]');
    expect(fieldWords('timeZone')).toBe('time zone');
  });
});
