import { connect, type Socket } from 'node:net';
import { connect as tlsConnect, type ConnectionOptions } from 'node:tls';
import mqttPacket, { type IConnackPacket, type IConnectPacket, type IPublishPacket, type Packet } from 'mqtt-packet';

/**
 * A bare MQTT 3.1.1 connection on a socket: sends exactly the packets (or bytes) a test gives it and records what
 * comes back, so a test can see a PUBACK that is missing, a CONNACK code, or the broker hanging up.
 */
export interface RawClient {
  socket: Socket;
  /** Every packet received so far, in order (PUBACKs only while `keepPubacks`). */
  received: Packet[];
  /** PUBACKs received so far. */
  pubacks(): number;
  /** Set false to count PUBACKs without keeping them (long runs). */
  keepPubacks: boolean;
  send(p: Packet | Buffer): void;
  /** Resolves with the next received packet of this kind (one not handed out before), or rejects when the socket closes first. */
  next<C extends Packet['cmd']>(cmd: C, what?: string): Promise<Extract<Packet, { cmd: C }>>;
  /** Resolves when the broker (or we) closed the connection. */
  closed: Promise<void>;
  isClosed(): boolean;
  destroy(): void;
}

export async function rawSocket(port: number, tls?: ConnectionOptions): Promise<RawClient> {
  const socket: Socket = tls ? tlsConnect({ host: '127.0.0.1', port, ...tls }) : connect(port, '127.0.0.1');
  const received: Packet[] = [];
  const taken = new Set<Packet>();
  let pubacks = 0;
  let isClosed = false;
  const waiters = new Set<() => void>();
  const parser = mqttPacket.parser({ protocolVersion: 4 });
  parser.on('packet', (p: Packet) => {
    if (p.cmd === 'puback') pubacks++;
    if (p.cmd !== 'puback' || client.keepPubacks) received.push(p);
    for (const w of [...waiters]) w();
  });
  parser.on('error', () => socket.destroy());
  socket.on('data', (d: Buffer) => parser.parse(d));
  socket.on('error', () => undefined);
  const closed = new Promise<void>((res) =>
    socket.once('close', () => {
      isClosed = true;
      for (const w of [...waiters]) w();
      res();
    }),
  );
  await new Promise<void>((res, rej) => {
    socket.once(tls ? 'secureConnect' : 'connect', () => res());
    socket.once('error', rej);
  });
  const client: RawClient = {
    socket,
    received,
    pubacks: () => pubacks,
    keepPubacks: true,
    send: (p) => socket.write(Buffer.isBuffer(p) ? p : mqttPacket.generate(p)),
    next: <C extends Packet['cmd']>(cmd: C, what: string = cmd) =>
      new Promise<Extract<Packet, { cmd: C }>>((res, rej) => {
        const check = () => {
          const p = received.find((x) => x.cmd === cmd && !taken.has(x));
          if (p) {
            taken.add(p);
            waiters.delete(check);
            return res(p as Extract<Packet, { cmd: C }>);
          }
          if (isClosed) {
            waiters.delete(check);
            rej(new Error(`connection closed before ${what}`));
          }
        };
        waiters.add(check);
        check();
      }),
    closed,
    isClosed: () => isClosed,
    destroy: () => socket.destroy(),
  };
  return client;
}

export type ConnectFields = Partial<Omit<IConnectPacket, 'cmd'>>;

/** Opens a socket and sends CONNECT (username = serial, client id = serial unless overridden); resolves with the CONNACK. */
export async function rawConnect(
  port: number,
  serial: string,
  password: string,
  fields: ConnectFields = {},
  tls?: ConnectionOptions,
): Promise<{ c: RawClient; connack: IConnackPacket }> {
  const c = await rawSocket(port, tls);
  c.send({
    cmd: 'connect',
    protocolId: 'MQTT',
    protocolVersion: 4,
    clean: true,
    clientId: serial,
    keepalive: 60,
    username: serial,
    password: Buffer.from(password),
    ...fields,
  });
  const connack = await c.next('connack', `the CONNACK for ${serial}`);
  return { c, connack };
}

/** A QoS 1 PUBLISH packet. */
export const qos1 = (topic: string, payload: string | Buffer, messageId: number, retain = false, dup = false): IPublishPacket => ({
  cmd: 'publish',
  topic,
  payload,
  qos: 1,
  messageId,
  retain,
  dup,
});
