import { SERIAL_PATTERN } from '../shared/contracts/wire-format';
import { UNIT_PUBLISH_LEAVES, unitPrefix } from '../shared/contracts/topics';

/** A unit the message engine lets in: its serial (the MQTT user name), the bcrypt hash of its device secret, its site. */
export interface EngineUnit {
  serial: string;
  engineSecretHash: string;
  siteId: number;
}

/** What ingest workers take from the engine: the leaves that are stored or feed the health engine. */
export const WORKER_LEAVES = ['telemetry', 'events', 'weather', 'status'] as const;

/** The worker partition a site's units go to (every unit of a site on one worker: the health engine compares peers). */
export const sitePartition = (siteId: number, partitions: number): number => siteId % partitions;

/** MQTT topic filter of one worker partition (the engine re-publishes the units' leaves below it). */
export const partitionFilter = (partition: number): string => `bw/s/${partition}/#`;

const PARTITION_TOPIC = /^bw\/s\/(\d+)\/v1\/units\/([^/]+)\/([a-z]+)$/;
/** `bw/s/<partition>/v1/units/<serial>/<leaf>` → its parts; null for anything else. */
export function parsePartitionTopic(topic: string): { partition: number; serial: string; leaf: string } | null {
  const m = PARTITION_TOPIC.exec(topic);
  return m ? { partition: Number(m[1]), serial: m[2]!, leaf: m[3]! } : null;
}

/** MQTT topic → NATS subject as the engine's MQTT gateway maps it (levels joined by dots). */
export const natsSubject = (mqttTopic: string): string => mqttTopic.replace(/\/$/, '').split('/').join('.');

/** Where a unit's partitioned leaves are re-published: `bw.s.<partition>.v1.units.<serial>` (its prefix below the partition). */
const partitionSubject = (u: EngineUnit, partitions: number) =>
  `bw.s.${sitePartition(u.siteId, partitions)}.${natsSubject(unitPrefix(u.serial)).slice('bw.'.length)}`;

const BCRYPT = /^\$2[aby]?\$\d\d\$[./A-Za-z0-9]{53}$/;
const quoted = (s: string) => JSON.stringify(s);

/**
 * The engine's `authorization` block (NATS 2.9 configuration, included by each node's file): one user per enabled unit
 * with the same topic rules as the built-in broker — publish only its own telemetry, events, acks, status and weather,
 * subscribe only below its own prefix — and the service user the servers and workers connect as. `$MQTT.sub.>` is the
 * gateway's delivery subject for QoS 1 subscriptions (MQTT clients cannot subscribe to `$MQTT` topics themselves).
 */
export function natsAuthorization(
  units: readonly EngineUnit[],
  service: { user: string; passwordHash: string },
  /** Worker partitions: each unit's telemetry, events, weather and status are re-published below its site's partition. */
  partitions = 0,
): string {
  for (const u of units) {
    if (!SERIAL_PATTERN.test(u.serial)) throw new Error(`not a unit serial: ${JSON.stringify(u.serial)}`);
    if (!BCRYPT.test(u.engineSecretHash)) throw new Error(`unit ${u.serial}: the engine secret is not a bcrypt hash`);
  }
  if (!BCRYPT.test(service.passwordHash)) throw new Error('the service password is not a bcrypt hash');
  const lines = [
    '# Written by the Brightward server from the unit table: do not edit (it is rewritten on every unit change).',
    'authorization {',
    '  users = [',
    `    { user: ${quoted(service.user)}, password: ${quoted(service.passwordHash)} }`,
  ];
  for (const u of units) {
    const own = natsSubject(unitPrefix(u.serial));
    // The engine checks a publish against the subject it is mapped to: a partitioned leaf is allowed there.
    const mappedTo = partitions > 0 ? partitionSubject(u, partitions) : null;
    const publish = UNIT_PUBLISH_LEAVES.map((leaf) =>
      quoted(mappedTo && (WORKER_LEAVES as readonly string[]).includes(leaf) ? `${mappedTo}.${leaf}` : `${own}.${leaf}`),
    ).join(', ');
    lines.push(
      `    { user: ${quoted(u.serial)}, password: ${quoted(u.engineSecretHash)}, permissions: { publish: { allow: [${publish}] }, subscribe: { allow: [${quoted(`${own}.>`)}, "$MQTT.sub.>"] } } }`,
    );
  }
  lines.push('  ]', '}');
  if (partitions > 0) {
    // Subject mappings: applied to every publish, after the unit's own permissions were checked on the original subject.
    lines.push('mappings = {');
    for (const u of units) {
      const own = natsSubject(unitPrefix(u.serial));
      const to = partitionSubject(u, partitions);
      for (const leaf of WORKER_LEAVES) lines.push(`  ${quoted(`${own}.${leaf}`)}: ${quoted(`${to}.${leaf}`)}`);
    }
    lines.push('}');
  }
  lines.push('');
  return lines.join('\n');
}
