import type { Knex } from 'knex';
import { TelemetryRepository } from '../../server/data/telemetry-repository';

/**
 * A day of 5-second reports for one unit, written straight to the database: an irradiance arch over daylight with a
 * passing cloud, detector pairs straddling it with a small differential, angles following a slow path, and a scan in
 * the morning (mode change events). For browser checks of the trace explorer only.
 */
export async function insertDayOfTelemetry(db: Knex, unitId: number, dayStartUtcMs: number, intervalS = 5): Promise<number> {
  const rows: Record<string, unknown>[] = [];
  const n = Math.floor(86_400 / intervalS);
  const scanFrom = dayStartUtcMs + 9 * 3_600_000;
  const scanTo = scanFrom + 4 * 60_000;
  for (let k = 0; k < n; k++) {
    const ts = dayStartUtcMs + k * intervalS * 1000;
    const h = (ts - dayStartUtcMs) / 3_600_000;
    const sun = Math.max(0, Math.sin((Math.PI * (h - 4)) / 16));
    const cloud = h > 13 && h < 13.5 ? 0.35 : 1;
    const scanning = ts >= scanFrom && ts < scanTo;
    const poa = Math.round((880 * sun * cloud + (sun > 0 ? 25 : 0) + (k % 7)) * 10) / 10;
    const diff = sun > 0 ? Math.sin(k / 40) * 6 : 0;
    const tilt = sun > 0 ? 60 - 35 * sun : 80;
    const az = sun > 0 ? 70 + ((h - 4) / 16) * 220 : 180;
    rows.push({
      unit_id: unitId, ts: new Date(ts), seq: k,
      tilt_plus_wm2: Math.max(0, poa * 0.97 + diff), tilt_minus_wm2: Math.max(0, poa * 0.97 - diff),
      azimuth_plus_wm2: Math.max(0, poa * 0.96 + diff / 2), azimuth_minus_wm2: Math.max(0, poa * 0.96 - diff / 2),
      poa_wm2: poa, tilt_deg: scanning ? 10 + ((ts - scanFrom) / 240_000) * 70 : tilt, azimuth_deg: az,
      cmd_tilt_deg: scanning ? 80 : tilt, cmd_azimuth_deg: az,
      tilt_motor_a: scanning ? 1.2 : 0.05, azimuth_motor_a: 0.05, dc_power_w: Math.round(poa * 0.42 * 10) / 10, module_temp_c: 15 + 25 * sun,
      mode: scanning ? 'scanning' : sun > 0 ? 'settled' : 'stowed', received_at: new Date(ts),
    });
  }
  for (let i = 0; i < rows.length; i += 2000) await db('telemetry').insert(rows.slice(i, i + 2000));
  // Written past the ingest, so build the 1-minute rollup as the server's rollup worker would.
  await new TelemetryRepository(db).rollupMinuteRange([unitId], new Date(dayStartUtcMs), new Date(dayStartUtcMs + 86_400_000));
  await db('unit_events').insert([
    { unit_id: unitId, ts: new Date(scanFrom), kind: 'mode-change', body: JSON.stringify({ v: 1, kind: 'mode-change', mode: 'scanning' }) },
    { unit_id: unitId, ts: new Date(scanTo), kind: 'scan-complete', body: JSON.stringify({ v: 1, kind: 'scan-complete', message: 'best 905 W/m² at tilt 31°, azimuth 168°' }) },
  ]);
  return rows.length;
}
