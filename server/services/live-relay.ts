import type { AlarmLiveItem } from '../../shared/contracts/alarms';
import type { CommandView } from '../../shared/contracts/live';
import type { Telemetry, UnitStatus } from '../../shared/contracts/wire';
import { LiveHub } from './live-hub';
import type { UnitDirectory, UnitInfo } from './unit-directory';

/** The part of a message bus the relay needs (core NATS in engine mode; anything in tests). */
export interface LiveBus {
  publish(subject: string, data: Uint8Array): void;
  subscribe(subject: string, onMessage: (data: Uint8Array) => void): { unsubscribe(): void };
}

/** What one live event carries between processes: the same inputs a LiveHub takes, by unit id. */
export type LiveRelayEvent =
  | { k: 't'; unitId: number; t: Telemetry }
  | { k: 's'; unitId: number; st: UnitStatus }
  | { k: 'a'; unitId: number; alarm: AlarmLiveItem }
  | { k: 'c'; command: CommandView };

/** Live events of a site go on `bw.live.<siteId>`; servers take `bw.live.>`. */
export const liveSubject = (siteId: number) => `bw.live.${siteId}`;
export const LIVE_SUBJECTS = 'bw.live.>';

const enc = new TextEncoder();
const dec = new TextDecoder();

/**
 * The LiveHub of an ingest worker in engine mode: it keeps its own picture (the worker has no sockets) and also puts
 * every telemetry, status, alarm and command change on the bus, so each server's hub can replay it to its dashboards
 * with its own per-user filtering. Core NATS: at most once, no replay; a server started later shows units from their
 * next report.
 */
export class RelayingLiveHub extends LiveHub {
  constructor(
    units: UnitDirectory,
    private readonly bus: LiveBus,
  ) {
    super(units);
  }

  override onTelemetry(unit: UnitInfo, t: Telemetry): void {
    super.onTelemetry(unit, t);
    this.send(unit.siteId, { k: 't', unitId: unit.id, t });
  }

  override onStatus(unit: UnitInfo, st: UnitStatus): void {
    super.onStatus(unit, st);
    this.send(unit.siteId, { k: 's', unitId: unit.id, st });
  }

  override publishAlarm(unitId: number, alarm: AlarmLiveItem): void {
    super.publishAlarm(unitId, alarm);
    const unit = this.units.byUnitId(unitId);
    if (unit) this.send(unit.siteId, { k: 'a', unitId, alarm });
  }

  override publishCommand(command: CommandView): void {
    super.publishCommand(command);
    const unit = this.units.byUnitId(command.unitId);
    if (unit) this.send(unit.siteId, { k: 'c', command });
  }

  private send(siteId: number, ev: LiveRelayEvent): void {
    this.bus.publish(liveSubject(siteId), enc.encode(JSON.stringify(ev)));
  }
}

/**
 * A server in engine mode: replays the workers' live events into its own hub. Units the server's directory does not
 * know (yet) are skipped: the hub could not say who may see them.
 */
export function followLive(bus: LiveBus, hub: LiveHub, units: UnitDirectory, onError: (err: Error) => void): () => void {
  const sub = bus.subscribe(LIVE_SUBJECTS, (data) => {
    let ev: LiveRelayEvent;
    try {
      ev = JSON.parse(dec.decode(data)) as LiveRelayEvent;
    } catch (err) {
      onError(new Error(`live event is not JSON: ${(err as Error).message}`));
      return;
    }
    if (ev.k === 'c') return hub.publishCommand(ev.command);
    if (ev.k === 'a') return hub.publishAlarm(ev.unitId, ev.alarm);
    const unit = units.byUnitId(ev.unitId);
    if (!unit) return;
    if (ev.k === 't') hub.onTelemetry(unit, ev.t);
    else if (ev.k === 's') hub.onStatus(unit, ev.st);
    else onError(new Error(`live event of unknown kind ${JSON.stringify((ev as { k: unknown }).k)}`));
  });
  return () => sub.unsubscribe();
}
