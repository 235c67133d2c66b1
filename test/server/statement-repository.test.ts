/** The statements' read of 15-minute rows (a prepared statement, rows as arrays, into columns): every value as stored, NULLs as NaN. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { StatementRepository } from '../../server/data/statement-repository';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

let t: TestDatabase;
let ids: number[] = [];
const B = Date.parse('2026-11-15T10:15:00Z');

beforeAll(async () => {
  t = await createTestDatabase({ seed: true });
  ids = await t.db('units').orderBy('id').limit(3).pluck('id');
  const base = { minutes: 15, samples: 180, poa_avg_wm2: 612.5, poa_max_wm2: 700, dc_power_avg_w: 230.25, energy_wh: 57.5625 };
  await t.db('telemetry_15m').insert([
    {
      unit_id: ids[0],
      bucket: new Date(B),
      ...base,
      module_temp_avg_c: 31.25,
      tilt_avg_deg: 42,
      azimuth_avg_deg: 187.5,
      seeking_min: 1.5,
      settled_min: 12,
      scanning_min: 0.5,
      stowed_min: 0.25,
      held_min: 0.5,
      fault_min: 0.25,
      model_unit_wm2: 640.1,
      model_best_wm2: 655.2,
      model_fixed_wm2: 480.3,
      model_sun_wm2: 650.4,
    },
    // An older row without the statement columns.
    { unit_id: ids[1], bucket: new Date(B), ...base, minutes: 7 },
    // Outside the window, and a unit not asked for.
    { unit_id: ids[0], bucket: new Date(B + 86_400_000), ...base },
    { unit_id: ids[2], bucket: new Date(B), ...base },
  ]);
});

afterAll(async () => {
  await t?.drop();
});

describe('StatementRepository.quarterColumns', () => {
  const FROM = B - 3_600_000;
  const TO = B + 3_600_000;
  const K = (B - FROM) / 900_000; // the rows' bucket index: 4

  it('reads the asked units in the window into their columns as stored, NULL and no row as NaN', async () => {
    const c = await new StatementRepository(t.db).quarterColumns([ids[0]!, ids[1]!], FROM, TO);
    expect(c.buckets).toBe(8);
    expect(c.rows).toBe(2);
    expect(c.unitIds).toEqual([ids[0], ids[1]]);
    const at = (slot: number) => slot * c.buckets + K;
    const values = (ix: number) => ({
      minutes: c.minutes[ix],
      poaAvgWm2: c.poaAvgWm2[ix],
      energyWh: c.energyWh[ix],
      moduleTempC: c.moduleTempC[ix],
      settledMin: c.settledMin[ix],
      stowedMin: c.stowedMin[ix],
      heldMin: c.heldMin[ix],
      faultMin: c.faultMin[ix],
      modelUnitWm2: c.modelUnitWm2[ix],
      modelBestWm2: c.modelBestWm2[ix],
      modelFixedWm2: c.modelFixedWm2[ix],
      modelSunWm2: c.modelSunWm2[ix],
    });
    expect(values(at(0))).toEqual({
      minutes: 15,
      poaAvgWm2: 612.5,
      energyWh: 57.5625,
      moduleTempC: 31.25,
      settledMin: 12,
      stowedMin: 0.25,
      heldMin: 0.5,
      faultMin: 0.25,
      modelUnitWm2: 640.1,
      modelBestWm2: 655.2,
      modelFixedWm2: 480.3,
      modelSunWm2: 650.4,
    });
    // An older row: the statement columns are NULL.
    expect(values(at(1))).toEqual({
      minutes: 7,
      poaAvgWm2: 612.5,
      energyWh: 57.5625,
      moduleTempC: NaN,
      settledMin: NaN,
      stowedMin: NaN,
      heldMin: NaN,
      faultMin: NaN,
      modelUnitWm2: NaN,
      modelBestWm2: NaN,
      modelFixedWm2: NaN,
      modelSunWm2: NaN,
    });
    // Every other bucket of both units has no row.
    const filled = [...c.minutes.keys()].filter((ix) => !Number.isNaN(c.minutes[ix]));
    expect(filled).toEqual([at(0), at(1)]);
  });

  it('answers empty columns for no units', async () => {
    const c = await new StatementRepository(t.db).quarterColumns([], FROM, TO);
    expect(c.rows).toBe(0);
    expect(c.minutes.length).toBe(0);
  });
});
