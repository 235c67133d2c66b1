import { describe, expect, it } from 'vitest';
import { zenithEstimateDeg } from '../../server/services/statement-figures';
import { solarPosition } from '../../shared/solar-position';

describe('approximate solar zenith for daylight of unreported buckets', () => {
  it('stays within 1.5° of the full SPA over a year at 52° N (textbook approximations, Duffie & Beckman ch. 1)', () => {
    let worst = 0;
    for (let t = Date.parse('2026-01-01T00:00:00Z'); t < Date.parse('2027-01-01T00:00:00Z'); t += 7 * 3_600_000 + 13 * 60_000) {
      const spa = solarPosition({ latitudeDeg: 52.52, longitudeDeg: 13.4, elevationM: 0 }, t).zenithDeg;
      if (spa < 88) worst = Math.max(worst, Math.abs(zenithEstimateDeg(52.52, 13.4, t) - spa));
    }
    expect(worst).toBeLessThan(1.5);
  });
});
