import { describe, expect, it } from 'vitest';
import { HEALTH_SETTING_RANGES } from '../../server/health/health-settings';
import { HEALTH_SETTING_GROUPS, HEALTH_SETTING_WORDS } from '../../shared/contracts/health-setting-words';
import { rawWordsIn } from '../helpers/raw-words';

describe('health settings in words (the settings screen)', () => {
  it('has words for every setting the server has, and none for a setting it does not', () => {
    expect(Object.keys(HEALTH_SETTING_WORDS).sort()).toEqual(Object.keys(HEALTH_SETTING_RANGES).sort());
  });

  it('gives each setting a distinct label, a known group and one plain sentence of why, with no machine names', () => {
    const labels = Object.values(HEALTH_SETTING_WORDS).map((x) => x.label);
    expect(new Set(labels).size).toBe(labels.length);
    for (const [key, words] of Object.entries(HEALTH_SETTING_WORDS)) {
      expect(HEALTH_SETTING_GROUPS, key).toContain(words.group);
      expect(words.why, key).toMatch(/^[A-Z].*\.$/);
      expect(words.why.slice(0, -1), `${key}: one sentence`).not.toMatch(/[.!?] [A-Z]/);
      expect(rawWordsIn(`${words.label}. ${words.why}`), key).toEqual([]);
    }
  });
});
