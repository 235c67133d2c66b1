import type { Telemetry, UnitEvent } from '../../shared/contracts/wire';
import type { Db } from './db';
import { WIRE_VERSION } from '../../shared/contracts/wire-format';

/** A stored event of a scan. */
export interface ScanEvent {
  ts: Date;
  kind: string;
  body: UnitEvent;
}

/** Readings the health service needs from tables other services own (read-only). */
export class HealthReadRepository {
  constructor(private readonly db: Db) {}

  /** In-plane irradiance of the unit's last report before an instant that was not part of a scan. */
  async poaBefore(unitId: number, before: Date): Promise<number | null> {
    const r = await this.db('telemetry')
      .where('unit_id', unitId)
      .andWhere('ts', '<', before)
      .whereNot('mode', 'scanning')
      .orderBy('ts', 'desc')
      .first('poa_wm2');
    return r ? Number(r.poa_wm2) : null;
  }

  /** Stored telemetry of some units over a range, in time order, back in wire form (on-demand runs). */
  async telemetryRange(unitIds: number[], from: Date, to: Date, limit: number): Promise<{ unitId: number; t: Telemetry }[]> {
    const rows: Record<string, unknown>[] = await this.db('telemetry')
      .whereIn('unit_id', unitIds)
      .andWhere('ts', '>=', from)
      .andWhere('ts', '<', to)
      .orderBy('ts')
      .limit(limit);
    return rows.map((r) => ({ unitId: Number(r['unit_id']), t: telemetryOf(r) }));
  }

  /** Events of a scan: the `scan-samples` chunks and the `scan-complete` of the unit's latest (or a given) scan. */
  async scanEvents(unitId: number, commandId?: string): Promise<ScanEvent[]> {
    let id = commandId;
    if (!id) {
      const last = await this.db('unit_events').where({ unit_id: unitId, kind: 'scan-complete' }).orderBy('ts', 'desc').first('body');
      if (!last) return [];
      id = bodyOf(last.body).commandId;
      if (!id) return [];
    }
    const rows: { ts: Date; kind: string; body: unknown }[] = await this.db('unit_events')
      .where({ unit_id: unitId })
      .whereIn('kind', ['scan-samples', 'scan-complete'])
      .whereRaw("JSON_UNQUOTE(JSON_EXTRACT(body, '$.commandId')) = ?", [id])
      .orderBy('ts')
      .select('ts', 'kind', 'body');
    return rows.map((r) => ({ ts: r.ts, kind: r.kind, body: bodyOf(r.body) }));
  }
}

/** A stored event body (JSON text, or parsed by the driver). */
const bodyOf = (body: unknown) => (typeof body === 'string' ? JSON.parse(body) : body) as UnitEvent;

/** A stored telemetry row back in wire form. */
function telemetryOf(r: Record<string, unknown>): Telemetry {
  const n = (k: string) => Number(r[k]);
  return {
    v: WIRE_VERSION,
    seq: n('seq'),
    ts: new Date(r['ts'] as Date).toISOString(),
    tiltPlusWm2: n('tilt_plus_wm2'),
    tiltMinusWm2: n('tilt_minus_wm2'),
    azimuthPlusWm2: n('azimuth_plus_wm2'),
    azimuthMinusWm2: n('azimuth_minus_wm2'),
    poaWm2: n('poa_wm2'),
    tiltDeg: n('tilt_deg'),
    azimuthDeg: n('azimuth_deg'),
    cmdTiltDeg: n('cmd_tilt_deg'),
    cmdAzimuthDeg: n('cmd_azimuth_deg'),
    tiltMotorA: n('tilt_motor_a'),
    azimuthMotorA: n('azimuth_motor_a'),
    dcPowerW: n('dc_power_w'),
    moduleTempC: n('module_temp_c'),
    mode: r['mode'] as Telemetry['mode'],
    firmware: '',
  };
}
