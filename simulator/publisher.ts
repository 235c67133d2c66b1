/**
 * The only part of the simulator that touches MQTT. One client per unit, with the unit's own credentials (username =
 * serial, password = device secret), MQTT 3.1.1, a retained status with a last will, QoS 1 for everything the unit sends,
 * and a QoS 1 subscription to its own commands topic. Messages are published only while a unit's client is connected;
 * otherwise they stay in (or go back to) the unit's store-and-forward outbox, so nothing is queued inside mqtt.js.
 */
import mqtt, { type MqttClient } from 'mqtt';
import { commandSchema } from '../shared/contracts/wire';
import { MAX_PAYLOAD_BYTES, WIRE_VERSION } from '../shared/contracts/wire-format';
import { unitTopic } from '../shared/contracts/topics';
import { isoUtc } from './clock';
import type { Fleet } from './fleet';
import type { OutboundMessage } from './unit-model';

export interface PublisherOptions {
  /** Broker URL, e.g. mqtt://127.0.0.1:1884. */
  url: string;
  /** Device secret of a unit. */
  secretOf: (serial: string) => string;
  /** Delay between reconnect attempts [ms]; default 2000. */
  reconnectPeriodMs?: number;
  /** Simulated now, for the status timestamp. */
  now: () => number;
  log?: (line: string) => void;
}

export interface Publisher {
  /** Connects every unit; resolves when all have connected once (or rejects after `timeoutMs`). */
  start(timeoutMs?: number): Promise<void>;
  /** Sends what the fleet produced; returns how many were handed to the network. */
  publish(messages: OutboundMessage[]): number;
  /** Applies link faults (comms loss drops the unit's connection; recovery reconnects). */
  syncLinks(): void;
  connected(): number;
  /** Publishes an offline status for every unit and disconnects cleanly. */
  stop(): Promise<void>;
}

export function createPublisher(fleet: Fleet, opts: PublisherOptions): Publisher {
  const clients = new Map<string, MqttClient>();
  const cut = new Set<string>();
  const log = opts.log ?? (() => {});
  let stopping = false;

  function connect(serial: string): MqttClient {
    const statusTopic = unitTopic(serial, 'status');
    const unit = fleet.unit(serial)!;
    const c = mqtt.connect(opts.url, {
      clientId: serial,
      username: serial,
      password: opts.secretOf(serial),
      protocolVersion: 4, // the broker speaks MQTT 3.1.1 only
      clean: true,
      keepalive: 30,
      reconnectPeriod: opts.reconnectPeriodMs ?? 2000,
      connectTimeout: 10_000,
      queueQoSZero: false,
      will: { topic: statusTopic, payload: Buffer.from(JSON.stringify({ v: WIRE_VERSION, online: false })), qos: 1, retain: true },
    });
    c.on('connect', () => {
      fleet.setTransport(serial, true);
      c.publish(statusTopic, JSON.stringify({ v: WIRE_VERSION, online: true, ts: isoUtc(opts.now()), firmware: unit.firmware }), {
        qos: 1,
        retain: true,
      });
      c.subscribe(unitTopic(serial, 'commands'), { qos: 1 });
    });
    c.on('close', () => fleet.setTransport(serial, false));
    c.on('error', (e) => log(`[${serial}] ${e.message}`));
    c.on('message', (_topic, payload) => {
      let raw: unknown;
      try {
        raw = JSON.parse(payload.toString('utf8'));
      } catch {
        return log(`[${serial}] command is not JSON; ignored`);
      }
      const parsed = commandSchema.safeParse(raw);
      if (parsed.success) fleet.command(serial, parsed.data);
      else {
        const id = (raw as { commandId?: unknown })?.commandId;
        if (typeof id === 'string' && id.length > 0 && id.length <= 64)
          unit.rejectCommand(id, 'command does not match wire format v1', fleet.now());
      }
    });
    return c;
  }

  return {
    async start(timeoutMs = 15_000) {
      const waits: Promise<void>[] = [];
      for (const u of fleet.units) {
        fleet.setTransport(u.serial, false);
        const c = connect(u.serial);
        clients.set(u.serial, c);
        waits.push(new Promise<void>((res) => c.once('connect', () => res())));
      }
      let timer: NodeJS.Timeout | undefined;
      await Promise.race([
        Promise.all(waits),
        new Promise<void>((_, rej) => {
          timer = setTimeout(
            () => rej(new Error(`not every unit connected to ${opts.url} within ${timeoutMs} ms (${this.connected()}/${clients.size})`)),
            timeoutMs,
          );
        }),
      ]).finally(() => clearTimeout(timer));
    },
    publish(messages) {
      let sent = 0;
      const back = new Map<string, OutboundMessage[]>();
      for (const m of messages) {
        const c = clients.get(m.serial);
        const pending = back.get(m.serial);
        if (!c || !c.connected || pending) {
          if (pending) pending.push(m);
          else back.set(m.serial, [m]);
          continue;
        }
        const body = JSON.stringify(m.payload);
        if (Buffer.byteLength(body) > MAX_PAYLOAD_BYTES) {
          log(`[${m.serial}] ${m.leaf} message over ${MAX_PAYLOAD_BYTES} bytes dropped`);
          continue;
        }
        c.publish(unitTopic(m.serial, m.leaf), body, { qos: 1 });
        sent++;
      }
      // Not connected: back to the front of the unit's buffer, in order.
      for (const [serial, list] of back) fleet.unit(serial)?.outbox.unshift(list);
      return sent;
    },
    syncLinks() {
      for (const u of fleet.units) {
        const c = clients.get(u.serial);
        if (!c) continue;
        if (u.commsLost && !cut.has(u.serial)) {
          cut.add(u.serial);
          c.end(true); // drop the connection without DISCONNECT: the broker publishes the last will
          fleet.setTransport(u.serial, false);
        } else if (!u.commsLost && cut.has(u.serial) && !stopping) {
          cut.delete(u.serial);
          const fresh = connect(u.serial);
          clients.set(u.serial, fresh);
        }
      }
    },
    connected: () => [...clients.values()].filter((c) => c.connected).length,
    async stop() {
      stopping = true;
      const within = <T>(p: Promise<T>, ms: number) => Promise.race([p, new Promise<void>((res) => setTimeout(res, ms).unref())]);
      await Promise.all(
        [...clients.entries()].map(async ([serial, c]) => {
          if (c.connected) {
            await within(
              c
                .publishAsync(unitTopic(serial, 'status'), JSON.stringify({ v: WIRE_VERSION, online: false, ts: isoUtc(opts.now()) }), {
                  qos: 1,
                  retain: true,
                })
                .catch(() => {}),
              2000,
            );
            await within(
              c.endAsync().catch(() => {}),
              2000,
            );
          }
          c.end(true); // no-op when already ended; stops reconnect attempts otherwise
        }),
      );
    },
  };
}
