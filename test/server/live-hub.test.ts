import { describe, expect, it } from 'vitest';
import { LiveHub } from '../../server/services/live-hub';
import type { LiveServerMessage } from '../../shared/contracts/live';
import { directoryOf, telemetryReport, unitInfo } from '../helpers/live-fixtures';

const units = [unitInfo(1, 1, 10, 'LH'), unitInfo(2, 1, 10, 'LH'), unitInfo(3, 2, 20, 'LH')];
const directory = directoryOf(units);
const report = (ts: string) => telemetryReport({ ts });

function listen(hub: LiveHub, caller: { id: number; role: 'technician' | 'owner'; ownerId: number | null }) {
  const got: LiveServerMessage[] = [];
  const session = hub.connect({ ...caller, email: '', name: '' } as never, (m) => got.push(m));
  session.handle({ type: 'subscribe', fleet: true });
  return () => got.filter((m) => m.type === 'units');
}

describe('live hub fan-out', () => {
  it('gives every fleet dashboard of one scope the same message object, and each owner only their own units', () => {
    let now = 10_000;
    const hub = new LiveHub(directory, 1000, 100, () => now);
    const techA = listen(hub, { id: 1, role: 'technician', ownerId: null });
    const techB = listen(hub, { id: 2, role: 'technician', ownerId: null });
    const owner1 = listen(hub, { id: 3, role: 'owner', ownerId: 1 });
    const owner2 = listen(hub, { id: 4, role: 'owner', ownerId: 2 });
    for (const u of units) hub.onTelemetry(u, report('2026-06-01T12:00:00.000Z'));
    now += 100;
    hub.flush();

    expect(techA()).toHaveLength(1);
    // One object for both staff dashboards: built (and serialized by the socket layer) once.
    expect(techA()[0]).toBe(techB()[0]);
    const ids = (msgs: LiveServerMessage[]) => msgs.flatMap((m) => (m.type === 'units' ? m.units.map((s) => s.unitId) : []));
    expect(ids(techA())).toEqual([1, 2, 3]);
    expect(ids(owner1())).toEqual([1, 2]);
    expect(ids(owner2())).toEqual([3]);
    expect(owner1()[0]).not.toBe(techA()[0]);
  });
});
