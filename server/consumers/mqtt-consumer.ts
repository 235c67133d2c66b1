import type { Logger } from 'pino';
import type { BrokerOptions, DenyReason, Principal } from '../../broker/broker';
import type { IngestService } from '../services/ingest-service';

/**
 * The MQTT entry point of the ingest. It runs inside the broker's publish authorisation, before aedes writes a QoS 1
 * PUBACK (a network subscriber could not keep up either, see README "Where the ceiling is"): the broker sends the
 * PUBACK only when the ingest acknowledges the message, i.e. once the batch holding it has committed. Until then aedes
 * reads nothing more from that unit's connection, and while the ingest buffer is over its high-water mark new
 * messages wait as well (back-pressure).
 */
export function unitMessageHandler(ingest: IngestService, log: Logger): NonNullable<BrokerOptions['onMessage']> {
  return (unit, leaf, payload, done) => {
    try {
      ingest.receive(unit.serial, leaf, payload, done);
    } catch (err) {
      // A handler bug must never stop the broker: log it and refuse the message (no PUBACK: the unit resends it).
      log.error({ err, serial: unit.serial, leaf }, 'unit message handler failed');
      done(err as Error);
    }
  };
}

const DENIED = { acl: 'acl_denied', retain: 'retain_denied', too_large: 'packet_too_large' } as const satisfies Record<DenyReason, string>;

/** Counts what the broker refused with the ingest's reject reasons, so `GET /api/metrics` shows every bad message in one place. */
export function countDenied(ingest: IngestService): NonNullable<BrokerOptions['onDenied']> {
  return (p: Principal | undefined, topic: string, reason: DenyReason) =>
    ingest.countDenied(p?.kind === 'unit' ? p.serial : '?', DENIED[reason], topic);
}
