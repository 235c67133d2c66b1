/**
 * MQTT topics of wire format v1 (MQTT 3.1.1). A unit owns everything below `bw/v1/units/<serial>/`.
 *   telemetry  unit → server, QoS 1      events  unit → server, QoS 1      acks  unit → server, QoS 1
 *   status     unit → server, retained; also the unit's last will ("offline")
 *   commands   server → unit, QoS 1      weather  the unit designated as its site's weather station → server, QoS 1
 * Retained only on `status`; a will only on the unit's own `status`.
 */
import { SERIAL_PATTERN_SOURCE, WIRE_VERSION } from './wire-format';

export const unitPrefix = (serial: string) => `bw/v${WIRE_VERSION}/units/${serial}/`;
export type UnitLeaf = 'telemetry' | 'events' | 'acks' | 'status' | 'commands' | 'weather';
export const unitTopic = (serial: string, leaf: UnitLeaf) => `${unitPrefix(serial)}${leaf}`;
/** The leaves a unit may publish to (below its own prefix only; `commands` is server → unit). */
export const UNIT_PUBLISH_LEAVES = ['telemetry', 'events', 'acks', 'status', 'weather'] as const satisfies readonly UnitLeaf[];
export type UnitPublishLeaf = (typeof UNIT_PUBLISH_LEAVES)[number];
const UNIT_TOPIC = new RegExp(`^bw/v${WIRE_VERSION}/units/(${SERIAL_PATTERN_SOURCE})/([a-z]+)$`);
/** Parses `bw/v1/units/<serial>/<leaf>`; null for anything else. */
export function parseUnitTopic(topic: string): { serial: string; leaf: string } | null {
  const m = UNIT_TOPIC.exec(topic);
  return m ? { serial: m[1]!, leaf: m[2]! } : null;
}
