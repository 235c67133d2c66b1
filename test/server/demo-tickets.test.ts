import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { seedDemoTickets } from '../../seeds/demo-tickets';
import { attachDemoPhotos } from '../../server/scripts/demo-photos';
import { FileStore } from '../../server/data/file-store';
import { pino } from 'pino';

let t: TestDatabase;
beforeAll(async () => {
  t = await createTestDatabase({ seed: true });
});
afterAll(async () => {
  await t?.drop();
});

const H = 3600_000;
const NOW = Date.parse('2026-11-20T12:00:00Z');

async function pastAlarm(serial: string, kind: string, severity: string, raisedMs: number, clearedMs: number): Promise<number> {
  const u = await t.db('units').where({ serial }).first('id', 'site_id');
  const [id] = await t.db('alarms').insert({
    unit_id: u.id,
    site_id: u.site_id,
    kind,
    severity,
    state: 'cleared',
    message: `${kind} on ${serial}`,
    advice: 'Look at it.',
    evidence: JSON.stringify({ seen: kind }),
    first_seen_at: new Date(raisedMs),
    raised_at: new Date(raisedMs),
    last_seen_at: new Date(clearedMs),
    cleared_at: new Date(clearedMs),
    clear_reason: 'recovered',
  });
  return id as number;
}

describe('the demo past gets the tickets its faults would have raised, worked and closed', () => {
  it('tickets P1/P2 at once and long P3s, works them in order, holds the unit on site, reopens a fault back within 7 days', async () => {
    const stall = await pastAlarm('QHL-2402', 'stall', 'P2', NOW - 10 * 24 * H, NOW - 10 * 24 * H + 6 * H);
    const shortP3 = await pastAlarm('QHL-2403', 'soiling', 'P3', NOW - 9 * 24 * H, NOW - 9 * 24 * H + 3 * H);
    const longP3 = await pastAlarm('QHL-2404', 'drift', 'P3', NOW - 9 * 24 * H, NOW - 9 * 24 * H + 30 * H);
    const p4 = await pastAlarm('QHL-2405', 'soiling', 'P4', NOW - 8 * 24 * H, NOW - 7 * 24 * H);
    const again = await pastAlarm('QHL-2402', 'stall', 'P2', NOW - 5 * 24 * H, NOW - 5 * 24 * H + 2 * H); // 5 days after the fix
    const recent = await pastAlarm('FSC-2402', 'not-stowed', 'P1', NOW - 10 * H, NOW - 6 * H); // resolved < 1 day ago
    const stillWorked = await pastAlarm('FSC-2403', 'stall', 'P1', NOW - 2 * H, NOW + H);

    expect(await seedDemoTickets(t.db, { now: new Date(NOW) })).toBe(3);
    const linked = async (alarmId: number) => t.db('ticket_alarms').where({ alarm_id: alarmId }).first('ticket_id');
    expect([await linked(shortP3), await linked(p4), await linked(stillWorked)]).toEqual([undefined, undefined, undefined]);

    const first = (await linked(stall))!.ticket_id;
    expect((await linked(again))!.ticket_id).toBe(first);
    const ticket = await t.db('tickets').where({ id: first }).first();
    expect(ticket).toMatchObject({
      state: 'closed',
      kind: 'stall',
      severity: 'P2',
      opened_by: null,
      availability_category: 'forced-outage',
    });
    const steps = await t.db('ticket_transitions').where({ ticket_id: first }).orderBy('id');
    expect(steps.map((s) => s.to_state)).toEqual([
      'new',
      'dispatched',
      'acknowledged',
      'on-site',
      'resolved',
      'closed',
      'reopened',
      'dispatched',
      'acknowledged',
      'on-site',
      'resolved',
      'closed',
    ]);
    const times = steps.map((s) => (s.at as Date).getTime());
    expect([...times].sort((a, b) => a - b)).toEqual(times);
    // Resolved when the fault cleared (or later), never before.
    expect((steps[4]!.at as Date).getTime()).toBeGreaterThanOrEqual(NOW - 10 * 24 * H + 6 * H);
    const holds = await t.db('unit_holds').where({ holder_kind: 'ticket', holder_id: first }).orderBy('id');
    expect(holds).toHaveLength(2);
    expect(holds.every((h) => h.released_at !== null && h.placed_at < h.released_at)).toBe(true);

    const p3Ticket = await t
      .db('tickets')
      .where({ id: (await linked(longP3))!.ticket_id })
      .first();
    expect(p3Ticket.opened_at.getTime()).toBe(NOW - 9 * 24 * H + 4 * H); // the 4 h rule
    const recentTicket = await t
      .db('tickets')
      .where({ id: (await linked(recent))!.ticket_id })
      .first();
    expect(recentTicket.state).toBe('resolved');

    // Again: nothing new, nothing doubled.
    const before = await t.db('ticket_transitions').count({ n: '*' });
    expect(await seedDemoTickets(t.db, { now: new Date(NOW) })).toBe(0);
    expect(await t.db('ticket_transitions').count({ n: '*' })).toEqual(before);
  });

  it('gives the latest past tickets invented before and after photos through the upload checks, once', async () => {
    const store = await FileStore.open(t.config.files);
    try {
      const log = pino({ level: 'silent' });
      const n = await attachDemoPhotos(t.db, store, log);
      const tickets = await t.db('tickets').whereNotNull('unit_id').whereNotNull('resolved_at').count({ n: '*' });
      expect(n).toBe(Math.min(6, Number(tickets[0]!.n)) * 2);
      const files = await t
        .db('ticket_files as f')
        .join('tickets as k', 'k.id', 'f.ticket_id')
        .select('f.*', 'k.on_site_at', 'k.resolved_at');
      expect(files).toHaveLength(n);
      for (const f of files) {
        expect(f.content_type).toBe('image/jpeg');
        expect(f.thumb_key).not.toBeNull();
        expect(f.caption).toMatch(/demo drawing/);
        expect(f.uploaded_at.getTime()).toBeGreaterThanOrEqual(f.on_site_at.getTime());
        expect(f.uploaded_at.getTime()).toBeLessThanOrEqual(f.resolved_at.getTime());
        expect((await store.get(f.object_key))?.length).toBe(f.size_bytes);
      }
      expect(await attachDemoPhotos(t.db, store, log)).toBe(0);
    } finally {
      await store.close();
    }
  });
});
