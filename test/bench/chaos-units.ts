/**
 * Units for the chaos run, as a child process: each connects on a raw socket (hand-built MQTT 3.1.1 via mqtt-packet),
 * stores its readings and forwards them as real units do — at most `inflight` unacknowledged QoS 1 publishes at a
 * time, everything acknowledged is forgotten, everything else is sent again (DUP) after a reconnect. Readings are
 * generated at the aggregate rate the parent sets, whether or not the unit is connected.
 *
 * IPC in: { type: 'rate', rate } | { type: 'finish' } (stop generating, deliver the rest, report).
 * IPC out: { type: 'ready' } | { type: 'counts', sent, acked, connected } | { type: 'done', file } where `file` holds the
 * acknowledged readings as lines "<serial> <ts ms>".
 */
import { connect, type Socket } from 'node:net';
import { writeFileSync } from 'node:fs';
import mqttPacket from 'mqtt-packet';
import { unitTopic } from '../../shared/contracts/topics';

interface Reading {
  tsMs: number;
  payload: string;
}
interface Unit {
  serial: string;
  topic: string;
  socket?: Socket;
  ready: boolean;
  nextId: number;
  lastTs: number;
  seq: number;
  queue: Reading[];
  inflight: Map<number, Reading>;
  acked: number[];
}

const [port, password, outFile, inflightArg, ...serials] = process.argv.slice(2);
const INFLIGHT = Number(inflightArg);
const units: Unit[] = serials.map((serial) => ({
  serial,
  topic: unitTopic(serial, 'telemetry'),
  ready: false,
  nextId: 1,
  lastTs: 0,
  seq: 0,
  queue: [],
  inflight: new Map(),
  acked: [],
}));
let rate = 0;
let sent = 0;
let acked = 0;
let finishing = false;

function dial(u: Unit): void {
  const socket = connect(Number(port), '127.0.0.1');
  socket.setNoDelay(true);
  u.socket = socket;
  const parser = mqttPacket.parser({ protocolVersion: 4 });
  parser.on('packet', (p) => {
    if (p.cmd === 'connack') {
      if (p.returnCode !== 0) return void socket.destroy();
      u.ready = true;
      // Everything not acknowledged on the last connection goes again, oldest first, flagged as a duplicate.
      for (const [id, r] of [...u.inflight].sort((a, b) => a[1].tsMs - b[1].tsMs)) write(u, id, r, true);
      pump(u);
    } else if (p.cmd === 'puback') {
      const r = u.inflight.get(p.messageId!);
      if (!r) return;
      u.inflight.delete(p.messageId!);
      u.acked.push(r.tsMs);
      acked++;
      pump(u);
    }
  });
  socket.on('data', (d) => parser.parse(d));
  socket.on('error', () => undefined);
  socket.on('close', () => {
    u.ready = false;
    u.socket = undefined;
    setTimeout(() => dial(u), 300 + Math.random() * 700);
  });
  socket.write(
    mqttPacket.generate({
      cmd: 'connect',
      protocolId: 'MQTT',
      protocolVersion: 4,
      clean: true,
      clientId: u.serial,
      keepalive: 30,
      username: u.serial,
      password: Buffer.from(password!),
    }),
  );
}

function write(u: Unit, id: number, r: Reading, dup: boolean): void {
  u.socket?.write(mqttPacket.generate({ cmd: 'publish', topic: u.topic, payload: r.payload, qos: 1, messageId: id, retain: false, dup }));
}

function pump(u: Unit): void {
  while (u.ready && u.inflight.size < INFLIGHT && u.queue.length) {
    const r = u.queue.shift()!;
    let id = u.nextId;
    while (u.inflight.has(id)) id = id >= 65535 ? 1 : id + 1;
    u.nextId = id >= 65535 ? 1 : id + 1;
    u.inflight.set(id, r);
    write(u, id, r, false);
  }
}

function generate(u: Unit): void {
  u.lastTs = Math.max(Date.now(), u.lastTs + 1);
  const payload = `{"v":1,"seq":${u.seq++},"ts":"${new Date(u.lastTs).toISOString()}","tiltPlusWm2":612,"tiltMinusWm2":600,"azimuthPlusWm2":605,"azimuthMinusWm2":603,"poaWm2":644,"tiltDeg":35.2,"azimuthDeg":171,"cmdTiltDeg":35,"cmdAzimuthDeg":171,"tiltMotorA":0.1,"azimuthMotorA":0.05,"dcPowerW":252,"moduleTempC":31,"mode":"settled","firmware":"2.4.1"}`;
  u.queue.push({ tsMs: u.lastTs, payload });
  sent++;
  pump(u);
}

let owed = 0;
let cursor = 0;
let last = performance.now();
setInterval(() => {
  const now = performance.now();
  owed += (rate * (now - last)) / 1000;
  last = now;
  while (owed >= 1) {
    generate(units[cursor]!);
    cursor = (cursor + 1) % units.length;
    owed--;
  }
}, 10);

setInterval(() => {
  process.send?.({ type: 'counts', sent, acked, connected: units.filter((u) => u.ready).length });
  if (finishing && units.every((u) => !u.queue.length && !u.inflight.size)) done();
}, 200);

let reported = false;
function done(): void {
  if (reported) return;
  reported = true;
  writeFileSync(outFile!, units.flatMap((u) => u.acked.map((t) => `${u.serial} ${t}`)).join('\n') + '\n');
  process.send?.({
    type: 'done',
    file: outFile,
    sent,
    acked,
    undelivered: units.reduce((s, u) => s + u.queue.length + u.inflight.size, 0),
  });
  for (const u of units) u.socket?.removeAllListeners('close').destroy();
  setTimeout(() => process.exit(0), 100);
}

process.on('message', (m: { type: string; rate?: number; timeoutMs?: number }) => {
  if (m.type === 'rate') rate = m.rate ?? 0;
  if (m.type === 'finish') {
    rate = 0;
    finishing = true;
    setTimeout(done, m.timeoutMs ?? 60_000);
  }
});

for (const u of units) dial(u);
const waitReady = setInterval(() => {
  if (units.every((u) => u.ready)) {
    clearInterval(waitReady);
    process.send?.({ type: 'ready' });
  }
}, 50);
