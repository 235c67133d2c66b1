import type { Aedes, PublishPacket } from 'aedes';
import type { Logger } from 'pino';
import { parseUnitTopic } from '../../shared/contracts/topics';
import type { IngestService } from '../services/ingest-service';

const LEAVES = ['telemetry', 'events', 'acks', 'status', 'weather'];

/**
 * Subscribes inside the broker's process (aedes's own subscribe: a network subscriber cannot keep up, see README
 * "Where the ceiling is") and hands each unit message to the ingest. While the ingest buffer is over its high-water
 * mark the delivery callback is held, which pauses aedes reading from publishers' sockets.
 */
export async function subscribeUnits(aedes: Aedes, ingest: IngestService, log: Logger): Promise<() => Promise<void>> {
  const deliver = (packet: PublishPacket, cb: () => void) => {
    const t = parseUnitTopic(packet.topic);
    try {
      if (!t) ingest.countDenied('?', packet.topic);
      else ingest.accept(t.serial, t.leaf, Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload));
    } catch (err) {
      // A handler bug must never stop the broker: count it and go on.
      log.error({ err, topic: packet.topic }, 'unit message handler failed');
    }
    if (ingest.saturated) ingest.whenDrained(cb);
    else cb();
  };
  const topics = LEAVES.map((leaf) => `bw/v1/units/+/${leaf}`);
  for (const topic of topics) await new Promise<void>((res) => aedes.subscribe(topic, deliver, () => res()));
  return async () => {
    for (const topic of topics) await new Promise<void>((res) => aedes.unsubscribe(topic, deliver, () => res()));
  };
}
