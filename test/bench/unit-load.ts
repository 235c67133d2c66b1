/**
 * Load generator for the ingest benchmark, run as a child process: many unit connections on raw sockets (hand-built
 * MQTT 3.1.1 packets via mqtt-packet, lighter than a full client) publishing QoS 1 telemetry at an aggregate rate the
 * parent sets over IPC. Each message's `ts` is its publish time, unique per unit.
 */
import { connect, type Socket } from 'node:net';
import mqttPacket from 'mqtt-packet';
import { unitTopic } from '../../shared/contracts/topics';

/** The values a unit reports (the rest of its report is fixed); the parent may send its own before the load starts. */
export interface UnitLoadReading {
  tiltPlusWm2: number;
  tiltMinusWm2: number;
  azimuthPlusWm2: number;
  azimuthMinusWm2: number;
  poaWm2: number;
  tiltDeg: number;
  azimuthDeg: number;
  dcPowerW: number;
}

interface Conn {
  serial: string;
  topic: string;
  socket: Socket;
  nextId: number;
  lastTs: number;
  seq: number;
  ready: boolean;
  sentAt: Map<number, number>;
}

const [port, password, ...serials] = process.argv.slice(2);
const conns: Conn[] = [];
let rate = 0;
let r: UnitLoadReading = {
  tiltPlusWm2: 612,
  tiltMinusWm2: 600,
  azimuthPlusWm2: 605,
  azimuthMinusWm2: 603,
  poaWm2: 644,
  tiltDeg: 35.2,
  azimuthDeg: 171,
  dcPowerW: 252,
};
let published = 0;
let acked = 0;
let cursor = 0;
/** Publish → PUBACK lags [ms] while the parent measures (the broker acknowledges after the commit). */
let measuring = false;
let ackLags: number[] = [];

async function open(serial: string): Promise<Conn> {
  const socket = connect(Number(port), '127.0.0.1');
  socket.setNoDelay(true);
  const c: Conn = { serial, topic: unitTopic(serial, 'telemetry'), socket, nextId: 1, lastTs: 0, seq: 0, ready: false, sentAt: new Map() };
  const parser = mqttPacket.parser({ protocolVersion: 4 });
  await new Promise<void>((res, rej) => {
    parser.on('packet', (p) => {
      if (p.cmd === 'connack') {
        if (p.returnCode !== 0) return rej(new Error(`${serial}: CONNACK ${p.returnCode}`));
        c.ready = true;
        res();
      } else if (p.cmd === 'puback') {
        acked++;
        const at = c.sentAt.get(p.messageId!);
        c.sentAt.delete(p.messageId!);
        if (measuring && at !== undefined) ackLags.push(Date.now() - at);
      }
    });
    socket.on('data', (d) => parser.parse(d));
    socket.once('error', rej);
    socket.write(
      mqttPacket.generate({
        cmd: 'connect',
        protocolId: 'MQTT',
        protocolVersion: 4,
        clean: true,
        clientId: serial,
        keepalive: 120,
        username: serial,
        password: Buffer.from(password!),
      }),
    );
  });
  return c;
}

function publishOne(c: Conn): void {
  const now = Date.now();
  c.lastTs = Math.max(now, c.lastTs + 1);
  const payload = `{"v":1,"seq":${c.seq++},"ts":"${new Date(c.lastTs).toISOString()}","tiltPlusWm2":${r.tiltPlusWm2},"tiltMinusWm2":${r.tiltMinusWm2},"azimuthPlusWm2":${r.azimuthPlusWm2},"azimuthMinusWm2":${r.azimuthMinusWm2},"poaWm2":${r.poaWm2},"tiltDeg":${r.tiltDeg},"azimuthDeg":${r.azimuthDeg},"cmdTiltDeg":${r.tiltDeg},"cmdAzimuthDeg":${r.azimuthDeg},"tiltMotorA":0.1,"azimuthMotorA":0.05,"dcPowerW":${r.dcPowerW},"moduleTempC":31,"mode":"settled","firmware":"2.4.1"}`;
  const messageId = c.nextId;
  c.nextId = c.nextId >= 65535 ? 1 : c.nextId + 1;
  c.sentAt.set(messageId, now);
  c.socket.write(mqttPacket.generate({ cmd: 'publish', topic: c.topic, payload, qos: 1, messageId, retain: false, dup: false }));
  published++;
}

// Open-loop pacing: every 10 ms publish what the rate owes, round-robin over the connections.
let owed = 0;
let last = performance.now();
setInterval(() => {
  const now = performance.now();
  owed += (rate * (now - last)) / 1000;
  last = now;
  while (owed >= 1 && conns.length) {
    publishOne(conns[cursor]!);
    cursor = (cursor + 1) % conns.length;
    owed--;
  }
}, 10);

// The parent may be gone (it failed); then this process ends instead of throwing on the closed channel.
setInterval(() => (process.connected ? process.send?.({ type: 'counts', published, acked }) : process.exit(0)), 200);

process.on('message', (m: { type: string; rate?: number; on?: boolean; reading?: UnitLoadReading }) => {
  if (m.type === 'reading' && m.reading) r = m.reading;
  if (m.type === 'measure') {
    measuring = m.on ?? false;
    if (measuring) ackLags = [];
    else process.send?.({ type: 'ackLags', lags: ackLags });
  }
  if (m.type === 'rate') {
    rate = m.rate ?? 0;
    owed = 0;
  }
  if (m.type === 'stop') {
    rate = 0;
    setTimeout(() => {
      process.send?.({ type: 'counts', published, acked });
      for (const c of conns) c.socket.end();
      setTimeout(() => process.exit(0), 200);
    }, 1500);
  }
});

(async () => {
  // Connect in small parallel groups so the broker's authenticate is not flooded.
  for (let i = 0; i < serials.length; i += 200) conns.push(...(await Promise.all(serials.slice(i, i + 200).map(open))));
  process.send?.({ type: 'ready', connections: conns.length });
})().catch((err) => {
  console.error(String(err));
  process.exit(1);
});
