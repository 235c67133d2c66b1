/** The statements' read of 15-minute rows (a prepared statement, rows as arrays): every column back as stored, NULLs as null. */
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

describe('StatementRepository.quarters', () => {
  it('reads the asked units in the window with every column as stored and NULLs as null', async () => {
    const rows = await new StatementRepository(t.db).quarters([ids[0]!, ids[1]!], B - 3_600_000, B + 3_600_000);
    rows.sort((a, b) => a.unitId - b.unitId);
    expect(rows).toEqual([
      {
        unitId: ids[0],
        bucketMs: B,
        minutes: 15,
        poaAvgWm2: 612.5,
        energyWh: 57.5625,
        moduleTempC: 31.25,
        seekingMin: 1.5,
        settledMin: 12,
        scanningMin: 0.5,
        stowedMin: 0.25,
        heldMin: 0.5,
        faultMin: 0.25,
        modelUnitWm2: 640.1,
        modelBestWm2: 655.2,
        modelFixedWm2: 480.3,
        modelSunWm2: 650.4,
      },
      {
        unitId: ids[1],
        bucketMs: B,
        minutes: 7,
        poaAvgWm2: 612.5,
        energyWh: 57.5625,
        moduleTempC: null,
        seekingMin: null,
        settledMin: null,
        scanningMin: null,
        stowedMin: null,
        heldMin: null,
        faultMin: null,
        modelUnitWm2: null,
        modelBestWm2: null,
        modelFixedWm2: null,
        modelSunWm2: null,
      },
    ]);
    expect(await new StatementRepository(t.db).quarters([], B - 3_600_000, B + 3_600_000)).toEqual([]);
  });
});
