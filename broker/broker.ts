import { Aedes, type AuthenticateError, type Client, type ConnectPacket, type PublishPacket } from 'aedes';
import { createServer, type Server, type Socket } from 'node:net';
import { createServer as createTlsServer, type Server as TlsServer } from 'node:tls';
import type { AddressInfo } from 'node:net';
import { MAX_PAYLOAD_BYTES } from '../shared/contracts/wire-format';
import { UNIT_PUBLISH_LEAVES, type UnitPublishLeaf } from '../shared/contracts/topics';

/** A field unit, confined to its own topic prefix. */
export interface UnitPrincipal {
  kind: 'unit';
  serial: string;
}
/** Who a connected client is: a field unit or a server-side service. */
export type Principal = UnitPrincipal | { kind: 'service'; name: string };

/** Why a publish was refused (the connection is then closed: MQTT 3.1.1 has no per-message refusal). */
export type DenyReason = 'acl' | 'retain' | 'too_large';
/** Why a CONNECT was refused. */
export const REFUSALS = ['bad_credentials', 'identifier_rejected', 'will_denied', 'server_unavailable', 'protocol_version'] as const;
export type Refusal = (typeof REFUSALS)[number];

export interface BrokerLimits {
  /** Largest packet from an authenticated client [bytes]; a larger one closes the connection before it is buffered. */
  maxPacketBytes: number;
  /** Largest packet before the CONNACK, the CONNECT included [bytes]. */
  maxConnectBytes: number;
  /** A connection that has not sent CONNECT by then is closed [ms]; also the TLS handshake timeout. */
  connectTimeoutMs: number;
  /** Connections not yet authenticated at once; one more is closed at once. */
  maxPendingConnections: number;
}

export const DEFAULT_BROKER_LIMITS: BrokerLimits = {
  // A unit's payload is at most MAX_PAYLOAD_BYTES; the rest covers the topic and the packet header.
  maxPacketBytes: MAX_PAYLOAD_BYTES + 1024,
  // Serial, secret, client id and a short will: a few hundred bytes.
  maxConnectBytes: 1024,
  connectTimeoutMs: 10_000,
  maxPendingConnections: 2000,
};

/** Releases a unit message: resolve (the PUBACK may go out) or fail (the connection is closed without PUBACK). */
export type MessageDone = (err?: Error) => void;

export interface BrokerOptions {
  host: string;
  /** TCP port; 0 picks a free one (tests). */
  port: number;
  /** MQTT over TLS on its own port, with the same authentication and ACL. */
  tls?: { port: number; cert: string | Buffer; key: string | Buffer };
  /** Checks a CONNECT's username and password; resolves the principal, or null to refuse with "bad username or password". */
  authenticate: (username: string, password: string) => Promise<Principal | null>;
  /** Topic prefix of a unit; a unit may publish and subscribe only below it. */
  unitPrefix: (serial: string) => string;
  /**
   * Every publish of a unit the ACL allowed (its will included), before aedes acknowledges it. A QoS 1 PUBACK goes out
   * only when `done` is called, in the order the publishes arrived; `done(err)` closes the connection without PUBACK
   * (the unit resends on its next connection). Until then aedes reads nothing more from that connection.
   */
  onMessage?: (unit: UnitPrincipal, leaf: UnitPublishLeaf, payload: Buffer, done: MessageDone) => void;
  /**
   * Whether a message handed to `onMessage` also goes on to aedes's subscribers (default true). A server whose only
   * reader of unit messages is `onMessage` turns it off: no subscriber could match them, and aedes's routing of each
   * one (offline queues, topic match, the publish event) is then work for nobody. Wills and retained messages always go on.
   */
  forwardTaken?: boolean;
  onClientGone?: (principal: Principal, clientId: string) => void;
  /** A publish the ACL refused, or a packet over the size limit from an authenticated client. */
  onDenied?: (principal: Principal | undefined, topic: string, reason: DenyReason) => void;
  limits?: Partial<BrokerLimits>;
}

/** What the broker turned away, by kind (bad packets, refused CONNECTs, ACL refusals). `pending` is a gauge. */
export interface BrokerCounters {
  pending: number;
  refused: Record<Refusal, number>;
  pendingLimit: number;
  tooLarge: number;
  connectTimeouts: number;
  keepaliveTimeouts: number;
  protocolErrors: number;
  socketErrors: number;
  tlsErrors: number;
  publishesDenied: number;
  subscribesDenied: number;
  disconnectedByServer: number;
}

export interface RunningBroker {
  aedes: Aedes;
  port: number;
  /** Port of MQTT over TLS, when offered. */
  tlsPort: number | undefined;
  counters: BrokerCounters;
  clients(): number;
  /**
   * Closes every connection of that unit (its will is published) and refuses a CONNECT of it whose credential check
   * was already running. For a disabled unit or a rotated secret. Returns whether a connection was open.
   */
  disconnectUnit(serial: string): boolean;
  close(): Promise<void>;
}

/** An error the broker raised and counted itself (aedes then closes the connection). */
class BrokerRefusal extends Error {}

/** The part of mqtt-packet's parser that reads a packet's announced length (aedes has no packet-size option). */
interface PacketParser {
  _parseLength(): boolean;
  _emitError(err: Error): void;
  packet: { length: number };
}

/** MQTT 3.1.1 broker (aedes) on TCP (and TLS), with per-unit credentials, topic ACL and bounded pre-authentication memory. */
export async function startBroker(opts: BrokerOptions): Promise<RunningBroker> {
  const limits: BrokerLimits = { ...DEFAULT_BROKER_LIMITS, ...opts.limits };
  const counters: BrokerCounters = {
    pending: 0,
    refused: Object.fromEntries(REFUSALS.map((r) => [r, 0])) as Record<Refusal, number>,
    pendingLimit: 0,
    tooLarge: 0,
    connectTimeouts: 0,
    keepaliveTimeouts: 0,
    protocolErrors: 0,
    socketErrors: 0,
    tlsErrors: 0,
    publishesDenied: 0,
    subscribesDenied: 0,
    disconnectedByServer: 0,
  };
  const principals = new WeakMap<Client, Principal>();
  /** A unit connection's topic prefix (built once: every publish is checked against it) and its publishes awaiting PUBACK. */
  const unitConns = new WeakMap<Client, { prefix: string; queue: AckSlot[] }>();
  const wills = new WeakMap<Client, ConnectPacket['will'] | null>();
  const authenticated = new WeakSet<Client>();
  const settlePending = new WeakMap<Client, () => void>();
  const bySerial = new Map<string, Set<Client>>();
  /** Bumped by disconnectUnit: a credential check that started before it is refused. */
  const revocations = new Map<string, number>();
  /** Connections already counted: a connection closed for a fault counts once, by its first one. */
  const counted = new WeakSet<Client>();

  const refuse = (
    client: Client,
    done: (e: AuthenticateError, ok: false) => void,
    code: 2 | 3 | 4 | 5,
    reason: Refusal,
    message: string,
  ) => {
    counters.refused[reason]++;
    counted.add(client);
    const err = new BrokerRefusal(message) as unknown as AuthenticateError;
    err.returnCode = code as AuthenticateError['returnCode']; // aedes AuthErrorCode is a const enum: 2 identifier rejected, 3 server unavailable, 4 bad credentials, 5 not authorized
    done(err, false);
  };

  const publishLeaves: ReadonlySet<string> = new Set(UNIT_PUBLISH_LEAVES);
  /** The leaf a unit may publish to, or null when the topic is not one of its own publish topics. */
  const ownLeaf = (prefix: string, topic: string): UnitPublishLeaf | null => {
    if (!topic.startsWith(prefix)) return null;
    const leaf = topic.slice(prefix.length);
    return publishLeaves.has(leaf) ? (leaf as UnitPublishLeaf) : null;
  };

  /** Releases PUBACKs of one connection in the order its publishes arrived (MQTT 3.1.1 §4.6), whatever order their batches commit in. */
  const inOrder = (
    q: AckSlot[],
    handler: NonNullable<BrokerOptions['onMessage']>,
    p: UnitPrincipal,
    leaf: UnitPublishLeaf,
    payload: Buffer,
    done: (err: Error | null) => void,
  ) => {
    const slot: AckSlot = { done, ready: false, err: null };
    q.push(slot);
    try {
      // An inline arrow: a named one would be renamed at run time on every message (tsx keeps function names).
      handler(p, leaf, payload, (err) => releaseSlot(q, slot, err));
    } catch (err) {
      releaseSlot(q, slot, err as Error);
    }
  };

  const aedes = await Aedes.createBroker({
    connectTimeout: limits.connectTimeoutMs,
    preConnect: (client, packet, done) => {
      wills.set(client, packet.will ?? null);
      done(null, true);
    },
    authenticate: (client, username, password, done) => {
      const generation = revocations.get(username ?? '') ?? 0;
      opts
        .authenticate(username ?? '', password?.toString('utf8') ?? '')
        .then((p) => {
          if (!p) return refuse(client, done, 4, 'bad_credentials', 'Bad username or password');
          if (p.kind === 'unit') {
            // A unit's client id is its serial: otherwise one unit could take over another's session (and fire its will).
            if (client.id !== p.serial)
              return refuse(client, done, 2, 'identifier_rejected', `client id must be the unit serial ${p.serial}`);
            const will = wills.get(client);
            if (
              will &&
              (will.topic !== `${opts.unitPrefix(p.serial)}status` || (will.qos ?? 0) > 1 || will.payload.length > MAX_PAYLOAD_BYTES)
            ) {
              return refuse(client, done, 5, 'will_denied', `a unit's will must be its own status topic (got ${will.topic})`);
            }
            if ((revocations.get(p.serial) ?? 0) !== generation)
              return refuse(client, done, 3, 'server_unavailable', 'the unit was disconnected while signing in');
          }
          principals.set(client, p);
          done(null, true);
        })
        .catch((e: Error) => refuse(client, done, 3, 'server_unavailable', `the credential store could not be read: ${e.message}`));
    },
    authorizePublish: (client, packet, done) => {
      if (!client) return done(null); // broker-internal publish (in-process services)
      const p = principals.get(client);
      if (p?.kind === 'service') return done(null);
      if (!p) return done(new BrokerRefusal('publish before authentication'));
      let conn = unitConns.get(client);
      if (!conn) unitConns.set(client, (conn = { prefix: opts.unitPrefix(p.serial), queue: [] }));
      const leaf = ownLeaf(conn.prefix, packet.topic);
      // Own publish topics only, at QoS 0 or 1, retained only on status. (Whether a unit may report its site's weather
      // is the ingest's call: it depends on the unit's current settings, and a mismatch must not cut the unit off.)
      const reason: DenyReason | null = leaf === null || packet.qos > 1 ? 'acl' : packet.retain && leaf !== 'status' ? 'retain' : null;
      if (reason !== null || leaf === null) {
        counters.publishesDenied++;
        counted.add(client);
        opts.onDenied?.(p, packet.topic, reason ?? 'acl');
        return done(new BrokerRefusal(`publish refused (${reason}): ${packet.topic}`));
      }
      if (!opts.onMessage) return done(null);
      const handler = opts.onMessage;
      const payload = payloadOf(packet);
      // A will is published as the connection ends: there is no PUBACK to order, and nothing to wait for.
      if (client.closed) {
        try {
          handler(p, leaf, payload, () => undefined);
        } catch {
          // the handler reports its own failures; the will is published all the same
        }
        return done(null);
      }
      if (opts.forwardTaken === false && !packet.retain) (packet as TakenPacket)[TAKEN] = true;
      inOrder(conn.queue, handler, p, leaf, payload, done);
    },
    authorizeSubscribe: (client, sub, done) => {
      const p = client ? principals.get(client) : undefined;
      if (p?.kind === 'service') return done(null, sub);
      // A unit reads its own commands and nothing else: no wildcards, no other leaf, no other unit, no $SYS.
      if (p?.kind === 'unit' && sub.topic === `${opts.unitPrefix(p.serial)}commands`)
        return done(null, { ...sub, qos: Math.min(sub.qos, 1) as 0 | 1 });
      counters.subscribesDenied++;
      done(null, null); // a null subscription answers SUBACK 0x80 (failure) and keeps the client connected
    },
  });

  if (opts.forwardTaken === false) {
    // aedes acknowledges a QoS 1 publish and then publishes it to its subscribers through this method (aedes 1.2,
    // lib/handlers/publish.js); a message the ingest took ends here instead, with the same asynchronous completion.
    type Publish = (packet: PublishPacket, client?: Client | null | ((err?: Error) => void), done?: (err?: Error | null) => void) => void;
    const target = aedes as unknown as { publish: Publish };
    const publish = target.publish.bind(aedes);
    target.publish = (packet, client, done) => {
      if (typeof client === 'function' || (packet as TakenPacket)[TAKEN] !== true) return publish(packet, client, done);
      if (done) process.nextTick(done, null);
    };
  }

  aedes.on('connackSent', (packet, client) => {
    if (packet.returnCode !== 0) return;
    authenticated.add(client);
    settlePending.get(client)?.();
  });
  aedes.on('client', (client) => {
    const p = principals.get(client);
    if (p?.kind !== 'unit') return;
    let set = bySerial.get(p.serial);
    if (!set) bySerial.set(p.serial, (set = new Set()));
    set.add(client);
  });
  aedes.on('clientDisconnect', (client) => {
    const p = principals.get(client);
    if (!p) return;
    if (p.kind === 'unit') {
      const set = bySerial.get(p.serial);
      set?.delete(client);
      if (set && !set.size) bySerial.delete(p.serial);
    }
    opts.onClientGone?.(p, client.id);
  });
  const countError = (client: Client, err: Error & { code?: unknown; errorCode?: unknown }) => {
    if (err instanceof BrokerRefusal || counted.has(client)) return; // counted where it was raised, or already
    if (err.message === 'connection closed') return; // a PUBACK for a connection that is already gone
    counted.add(client);
    if (err.message === 'connect did not arrive in time') counters.connectTimeouts++;
    else if (err.message === 'keep alive timeout') counters.keepaliveTimeouts++;
    else if (err.errorCode === 1) counters.refused.protocol_version++;
    else if (typeof err.code === 'string' && err.code.startsWith('E')) counters.socketErrors++;
    else counters.protocolErrors++;
  };
  aedes.on('clientError', countError);
  aedes.on('connectionError', countError);

  /** Caps what a connection may make aedes buffer: the announced length of each packet is checked before its body is read. */
  const capPackets = (client: Client): boolean => {
    const parser = (client as unknown as { _parser?: Partial<PacketParser> })._parser;
    if (!parser || typeof parser._parseLength !== 'function' || typeof parser._emitError !== 'function') return false;
    const parseLength = parser._parseLength;
    const capped = parser as PacketParser;
    capped._parseLength = function capLength(this: PacketParser): boolean {
      if (!parseLength.call(this)) return false;
      const cap = authenticated.has(client) ? limits.maxPacketBytes : limits.maxConnectBytes;
      if (this.packet.length <= cap) return true;
      counters.tooLarge++;
      counted.add(client);
      const p = principals.get(client);
      if (p) opts.onDenied?.(p, '', 'too_large');
      this._emitError(new BrokerRefusal(`packet of ${this.packet.length} bytes is over the ${cap}-byte limit`));
      return false;
    };
    return true;
  };

  const onConnection = (socket: Socket) => {
    socket.on('error', () => undefined); // aedes reports errors of the connections it took; this covers the ones refused here
    if (counters.pending >= limits.maxPendingConnections) {
      counters.pendingLimit++;
      socket.destroy();
      return;
    }
    counters.pending++;
    let pending = true;
    const settle = () => {
      if (pending) {
        pending = false;
        counters.pending--;
      }
    };
    socket.once('close', settle);
    const client = aedes.handle(socket);
    settlePending.set(client, settle);
    // Fail closed: without the size cap a client could make aedes buffer 256 MB before authenticating.
    if (!capPackets(client)) socket.destroy(new Error('cannot cap MQTT packet size with this aedes version'));
  };

  const server: Server = createServer(onConnection);
  const servers: (Server | TlsServer)[] = [server];
  await listen(server, opts.port, opts.host);
  let tlsPort: number | undefined;
  if (opts.tls) {
    const tls = createTlsServer(
      { cert: opts.tls.cert, key: opts.tls.key, minVersion: 'TLSv1.2', handshakeTimeout: limits.connectTimeoutMs },
      onConnection,
    );
    tls.on('tlsClientError', (_err, socket) => {
      counters.tlsErrors++;
      socket.destroy();
    });
    servers.push(tls);
    try {
      await listen(tls, opts.tls.port, opts.host);
    } catch (err) {
      await new Promise<void>((res) => aedes.close(() => res()));
      await new Promise<void>((res) => server.close(() => res()));
      throw new Error(`MQTT over TLS on ${opts.host}:${opts.tls.port}: ${(err as Error).message}`);
    }
    tlsPort = (tls.address() as AddressInfo).port;
  }
  return {
    aedes,
    port: (server.address() as AddressInfo).port,
    tlsPort,
    counters,
    clients: () => aedes.connectedClients,
    disconnectUnit: (serial) => {
      revocations.set(serial, (revocations.get(serial) ?? 0) + 1);
      const open = [...(bySerial.get(serial) ?? [])].filter((c) => !c.closed);
      for (const c of open) {
        counters.disconnectedByServer++;
        c.close();
      }
      return open.length > 0;
    },
    close: async () => {
      await new Promise<void>((res) => aedes.close(() => res()));
      await Promise.all(servers.map((s) => new Promise<void>((res) => s.close(() => res()))));
    },
  };
}

/** Marks a unit's publish the ingest took (a property of aedes's packet: cheaper than a weak set per message). */
const TAKEN = Symbol('taken by onMessage');
type TakenPacket = PublishPacket & { [TAKEN]?: true };

/** A publish waiting for its PUBACK, in a connection's queue. */
interface AckSlot {
  done: (err: Error | null) => void;
  ready: boolean;
  err: Error | null;
}

/** Marks a slot released (once) and lets out every PUBACK at the head of the queue that is ready, in order. */
function releaseSlot(queue: AckSlot[], slot: AckSlot, err?: Error): void {
  if (slot.ready) return;
  slot.ready = true;
  slot.err = err ? new BrokerRefusal(`message not taken: ${err.message}`) : null;
  while (queue.length && queue[0]!.ready) {
    const s = queue.shift()!;
    s.done(s.err);
  }
}

function payloadOf(packet: PublishPacket): Buffer {
  return Buffer.isBuffer(packet.payload) ? packet.payload : Buffer.from(packet.payload);
}

function listen(server: Server | TlsServer, port: number, host: string): Promise<void> {
  return new Promise<void>((res, rej) => {
    server.once('error', rej);
    server.listen(port, host, () => {
      server.off('error', rej);
      res();
    });
  });
}
