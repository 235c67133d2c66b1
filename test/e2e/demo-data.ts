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
      unit_id: unitId,
      ts: new Date(ts),
      seq: k,
      tilt_plus_wm2: Math.max(0, poa * 0.97 + diff),
      tilt_minus_wm2: Math.max(0, poa * 0.97 - diff),
      azimuth_plus_wm2: Math.max(0, poa * 0.96 + diff / 2),
      azimuth_minus_wm2: Math.max(0, poa * 0.96 - diff / 2),
      poa_wm2: poa,
      tilt_deg: scanning ? 10 + ((ts - scanFrom) / 240_000) * 70 : tilt,
      azimuth_deg: az,
      cmd_tilt_deg: scanning ? 80 : tilt,
      cmd_azimuth_deg: az,
      tilt_motor_a: scanning ? 1.2 : 0.05,
      azimuth_motor_a: 0.05,
      dc_power_w: Math.round(poa * 0.42 * 10) / 10,
      module_temp_c: 15 + 25 * sun,
      mode: scanning ? 'scanning' : sun > 0 ? 'settled' : 'stowed',
      received_at: new Date(ts),
    });
  }
  for (let i = 0; i < rows.length; i += 2000) await db('telemetry').insert(rows.slice(i, i + 2000));
  // Written past the ingest, so build the 1-minute rollup as the server's rollup worker would.
  await new TelemetryRepository(db).rollupMinuteRange([unitId], new Date(dayStartUtcMs), new Date(dayStartUtcMs + 86_400_000));
  await db('unit_events').insert([
    { unit_id: unitId, ts: new Date(scanFrom), kind: 'mode-change', body: JSON.stringify({ v: 1, kind: 'mode-change', mode: 'scanning' }) },
    {
      unit_id: unitId,
      ts: new Date(scanTo),
      kind: 'scan-complete',
      body: JSON.stringify({ v: 1, kind: 'scan-complete', message: 'best 905 W/m² at tilt 31°, azimuth 168°' }),
    },
  ]);
  return rows.length;
}

/**
 * An open trap alarm on one unit, stored as the health service would store it: settled on a lesser peak (tilt 52°,
 * azimuth 250°) while the modelled best is tilt 30°, azimuth 178°. Returns the alarm's id.
 */
export async function insertTrapAlarm(db: Knex, unitId: number, siteId: number): Promise<number> {
  const seen = Date.now() - 40 * 60_000;
  const [alarmId] = await db('alarms').insert({
    unit_id: unitId,
    site_id: siteId,
    kind: 'trap',
    severity: 'P2',
    state: 'active',
    message:
      'Settled at tilt 52°, azimuth 250° on 410 W/m² while the brightest orientation (tilt 30°, azimuth 178°) gets 860 W/m²: losing 450 W/m² (52.3 %).',
    advice: 'Send a scan, then go to the brightest orientation it finds; raise the detector tilt from 6° to at least 14°.',
    evidence: JSON.stringify({
      readings: { poaWm2: 410, tiltDeg: 52, azimuthDeg: 250 },
      model: {
        globalMax: { tiltDeg: 30, azimuthDeg: 178, wm2: 860 },
        modelledHereWm2: 415,
        localMaxima: [{}, {}],
        minSinglePeakDetectorTiltDeg: 14,
      },
      lossWm2: 450,
      lossPct: 52.3,
      detectorTiltDeg: 6,
    }),
    first_seen_at: new Date(seen),
    raised_at: new Date(seen + 10 * 60_000),
    last_seen_at: new Date(Date.now() - 60_000),
  });
  if (alarmId === undefined) throw new Error('the alarm was not stored');
  return alarmId;
}

/** A finished scan of one unit 20 minutes ago, as the unit reports it: two peaks, the brighter at tilt 30°, azimuth 180°. */
export async function insertFinishedScan(db: Knex, unitId: number, commandId: string): Promise<void> {
  const scanAt = Date.now() - 20 * 60_000;
  const samples: [number, number, number][] = [];
  for (let t = 0; t <= 80; t += 10)
    for (let a = 90; a <= 300; a += 15) {
      const d1 = ((t - 30) / 25) ** 2 + ((a - 180) / 40) ** 2;
      const d2 = ((t - 50) / 15) ** 2 + ((a - 255) / 25) ** 2;
      samples.push([t, a, Math.round(120 + 740 * Math.exp(-d1) + 300 * Math.exp(-d2))]);
    }
  await db('unit_events').insert({
    unit_id: unitId,
    ts: new Date(scanAt),
    kind: 'scan-samples',
    body: JSON.stringify({ v: 1, ts: new Date(scanAt).toISOString(), kind: 'scan-samples', commandId, samples }),
  });
  await db('unit_events').insert({
    unit_id: unitId,
    ts: new Date(scanAt + 120_000),
    kind: 'scan-complete',
    body: JSON.stringify({ v: 1, ts: new Date(scanAt + 120_000).toISOString(), kind: 'scan-complete', commandId }),
  });
}
