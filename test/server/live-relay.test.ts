import { describe, expect, it } from 'vitest';
import { LiveHub } from '../../server/services/live-hub';
import { followLive, RelayingLiveHub, type LiveBus } from '../../server/services/live-relay';
import type { LiveServerMessage } from '../../shared/contracts/live';
import { directoryOf, telemetryReport, unitInfo } from '../helpers/live-fixtures';

const units = [unitInfo(1, 1, 10, 'LR'), unitInfo(2, 2, 20, 'LR')];
const directory = directoryOf(units);
const report = telemetryReport({ cmdTiltDeg: 31, cmdAzimuthDeg: 181, azimuthMinusWm2: 704 });

/** An in-process stand-in for core NATS: `bw.live.>` matches every subject below `bw.live.`. */
function memoryBus(): LiveBus & { subjects: string[] } {
  const subs: ((d: Uint8Array) => void)[] = [];
  const subjects: string[] = [];
  return {
    subjects,
    publish: (subject, data) => {
      subjects.push(subject);
      if (subject.startsWith('bw.live.')) for (const s of subs) s(data);
    },
    subscribe: (_subject, on) => {
      subs.push(on);
      return { unsubscribe: () => subs.splice(subs.indexOf(on), 1) };
    },
  };
}

describe('live relay between a worker and a server', () => {
  it("replays a worker's telemetry, status and alarms into the server's hub with its per-owner filtering", () => {
    const bus = memoryBus();
    const worker = new RelayingLiveHub(directory, bus);
    const server = new LiveHub(directory, 1000, 100, () => 5_000);
    const errors: Error[] = [];
    const stop = followLive(bus, server, directory, (e) => errors.push(e));
    const got: LiveServerMessage[] = [];
    const session = server.connect({ id: 7, role: 'owner', ownerId: 1, email: '', name: '' } as never, (m) => got.push(m));
    session.handle({ type: 'subscribe', fleet: true });

    worker.onTelemetry(units[0]!, report);
    worker.onTelemetry(units[1]!, report);
    worker.publishAlarm(1, { id: 99 } as never);
    worker.publishAlarm(2, { id: 98 } as never);
    server.flush();

    expect(bus.subjects).toEqual(['bw.live.10', 'bw.live.20', 'bw.live.10', 'bw.live.20']);
    const states = got.flatMap((m) => (m.type === 'units' ? m.units : []));
    // Owner 1 sees only unit 1, with the differences computed from the relayed report.
    expect(states.map((s) => [s.unitId, s.tiltDiffWm2, s.azimuthDiffWm2, s.cmdTiltDeg])).toEqual([[1, 10, 1, 31]]);
    expect(got.filter((m) => m.type === 'alarm').map((m) => (m.type === 'alarm' ? (m.alarm as unknown as { id: number }).id : 0))).toEqual([
      99,
    ]);
    expect(errors).toEqual([]);

    stop();
    worker.onStatus(units[0]!, { v: 1, online: false } as never);
    expect(server.get(1)?.online).toBe(true);
  });

  it('reports an event that is not JSON instead of throwing', () => {
    const bus = memoryBus();
    const errors: Error[] = [];
    followLive(bus, new LiveHub(directory), directory, (e) => errors.push(e));
    bus.publish('bw.live.10', new TextEncoder().encode('{oops'));
    expect(errors.map((e) => e.message)).toEqual([expect.stringContaining('live event is not JSON')]);
  });
});
