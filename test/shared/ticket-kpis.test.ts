import { describe, expect, it } from 'vitest';
import { ticketKpis, type KpiTicket } from '../../shared/tickets/ticket-kpis';

const H = 3600_000;
const M = 60_000;
const t = (over: Partial<KpiTicket>): KpiTicket => ({
  id: 1,
  faultKey: 'unit:1:stall',
  openedAtMs: 0,
  acknowledgedAtMs: null,
  onSiteAtMs: null,
  resolvedAtMs: null,
  state: 'new',
  clocks: [],
  visits: 0,
  repeated: false,
  ...over,
});

describe('work-order KPIs (hand-computed cases)', () => {
  it('takes means and medians over the tickets that have both ends of each interval', () => {
    const k = ticketKpis(
      [
        t({ acknowledgedAtMs: 10 * M, onSiteAtMs: 70 * M, resolvedAtMs: 130 * M, state: 'resolved', visits: 1 }),
        t({ acknowledgedAtMs: 30 * M, onSiteAtMs: 150 * M, resolvedAtMs: 4 * H, state: 'resolved', visits: 2 }),
        t({ acknowledgedAtMs: 50 * M, state: 'acknowledged' }),
        t({ state: 'new' }),
      ],
      10 * H,
    );
    expect(k.acknowledgement).toEqual({ n: 3, meanMin: 30, medianMin: 30 });
    expect(k.intervention).toEqual({ n: 2, meanMin: 90, medianMin: 90 }); // 60 and 120
    expect(k.response).toEqual({ n: 2, meanMin: 110, medianMin: 110 }); // 70 and 150
    expect(k.resolution).toEqual({ n: 2, meanMin: 75, medianMin: 75 }); // 60 and 90
    expect(k.mttrH).toBeCloseTo((130 / 60 + 4) / 2, 2);
    // Two visits is not a first-time fix.
    expect(k.firstTimeFixPct).toBe(50);
  });

  it('counts SLA clocks that came due or were met; a repeated fault is neither a first-time fix nor unrepeated', () => {
    const k = ticketKpis(
      [
        t({
          resolvedAtMs: 5 * H,
          state: 'resolved',
          visits: 1,
          repeated: true,
          clocks: [
            { dueAtMs: 1 * H, metAtMs: 0.5 * H }, // met
            { dueAtMs: 2 * H, metAtMs: 3 * H }, // met late: breached
            { dueAtMs: 100 * H, metAtMs: null }, // not due yet: not counted
          ],
        }),
        t({ clocks: [{ dueAtMs: 4 * H, metAtMs: null }] }), // overdue: breached
      ],
      6 * H,
    );
    expect([k.slaClocksCounted, k.slaCompliancePct]).toEqual([3, 33.3]);
    expect([k.firstTimeFixPct, k.repeatRepairPct]).toEqual([0, 100]);
  });

  it('gives null, not 0, where there is nothing to measure', () => {
    const k = ticketKpis([], 0);
    expect([k.opened, k.mttrH, k.slaCompliancePct, k.firstTimeFixPct, k.acknowledgement.meanMin]).toEqual([0, null, null, null, null]);
  });
});
