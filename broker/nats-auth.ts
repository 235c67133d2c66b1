import { SERIAL_PATTERN } from '../shared/contracts/wire-format';
import { UNIT_PUBLISH_LEAVES, unitPrefix } from '../shared/contracts/topics';

/** A unit the message engine lets in: its serial (the MQTT user name) and the bcrypt hash of its device secret. */
export interface EngineUnit {
  serial: string;
  engineSecretHash: string;
}

/** MQTT topic → NATS subject as the engine's MQTT gateway maps it (levels joined by dots). */
export const natsSubject = (mqttTopic: string): string => mqttTopic.replace(/\/$/, '').split('/').join('.');

const BCRYPT = /^\$2[aby]?\$\d\d\$[./A-Za-z0-9]{53}$/;
const quoted = (s: string) => JSON.stringify(s);

/**
 * The engine's `authorization` block (NATS 2.9 configuration, included by each node's file): one user per enabled unit
 * with the same topic rules as the built-in broker — publish only its own telemetry, events, acks, status and weather,
 * subscribe only below its own prefix — and the service user the servers and workers connect as. `$MQTT.sub.>` is the
 * gateway's delivery subject for QoS 1 subscriptions (MQTT clients cannot subscribe to `$MQTT` topics themselves).
 */
export function natsAuthorization(units: readonly EngineUnit[], service: { user: string; passwordHash: string }): string {
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
    const publish = UNIT_PUBLISH_LEAVES.map((leaf) => quoted(`${own}.${leaf}`)).join(', ');
    lines.push(
      `    { user: ${quoted(u.serial)}, password: ${quoted(u.engineSecretHash)}, permissions: { publish: { allow: [${publish}] }, subscribe: { allow: [${quoted(`${own}.>`)}, "$MQTT.sub.>"] } } }`,
    );
  }
  lines.push('  ]', '}', '');
  return lines.join('\n');
}
