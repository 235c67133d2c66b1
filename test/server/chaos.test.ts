import { describe, expect, it } from 'vitest';
import { CHAOS_SCENARIOS, runChaos } from '../bench/chaos';

// The short version of `npm run chaos`: the same three disruptions at a small load. Its own MariaDB on the test
// database's port + 1000 (the outage scenario stops it, so it cannot be the shared test server).
describe('chaos (short)', () => {
  it('loses no acknowledged reading and counts none twice when the server is killed, the database stops or the server restarts', async () => {
    const { scenarios } = await runChaos({
      units: 40,
      rate: 200,
      steadyS: 2,
      outageS: 4,
      scenarios: [...CHAOS_SCENARIOS],
      dbPort: Number(process.env['BW_DB_PORT'] ?? 3308) + 1000,
    });
    expect(scenarios.map((s) => s.name)).toEqual([...CHAOS_SCENARIOS]);
    for (const s of scenarios) {
      expect(s.sent, s.name).toBeGreaterThan(500);
      expect({ name: s.name, lost: s.lost, duplicated: s.duplicated, undelivered: s.detail.undelivered }).toEqual({
        name: s.name,
        lost: 0,
        duplicated: 0,
        undelivered: 0,
      });
      expect(s.acked, s.name).toBe(s.sent);
      expect(s.stored, s.name).toBe(s.sent);
    }
  }, 300_000);
});
