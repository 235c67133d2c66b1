import { TestBed } from '@angular/core/testing';
import type { DetectorRunResult } from '../../../shared/contracts/alarms';
import { alarmView } from '../testing/spec-fixtures';
import { replayRows, ReplayResults } from './replay-results';

const RESULT: DetectorRunResult = {
  from: '2026-06-21T08:00:00.000Z',
  to: '2026-06-21T14:00:00.000Z',
  units: 3,
  reports: 12960,
  alarms: [
    alarmView({ id: -1, kind: 'trap', severity: 'P3', unitId: 2, serial: 'QHL-2402', raisedAt: '2026-06-21T09:10:00.000Z' }),
    alarmView({ id: -2, kind: 'drift', severity: 'P3', unitId: 1, serial: 'QHL-2401', raisedAt: '2026-06-21T10:00:00.000Z' }),
  ],
  stored: [
    alarmView({
      id: 40,
      kind: 'trap',
      severity: 'P3',
      unitId: 2,
      serial: 'QHL-2402',
      raisedAt: '2026-06-21T09:12:00.000Z',
      clearedAt: '2026-06-21T11:00:00.000Z',
    }),
    alarmView({
      id: 41,
      kind: 'stall',
      severity: 'P2',
      unitId: 3,
      serial: 'QHL-2403',
      raisedAt: '2026-06-21T12:00:00.000Z',
      clearedAt: null,
    }),
    alarmView({ id: 42, kind: 'comms', severity: 'P2', unitId: null, serial: null, raisedAt: '2026-06-21T13:00:00.000Z' }),
  ],
};

describe('replayRows', () => {
  it('pairs the run and the store by unit and kind, units in order and the whole site last', () => {
    expect(replayRows(RESULT).map((r) => [r.serial, r.kind, r.run.length, r.stored.length, r.verdict])).toEqual([
      ['QHL-2401', 'drift', 1, 0, 'run-only'],
      ['QHL-2402', 'trap', 1, 1, 'both'],
      ['QHL-2403', 'stall', 0, 1, 'stored-only'],
      [null, 'comms', 0, 1, 'stored-only'],
    ]);
  });
});

async function render(result: DetectorRunResult) {
  TestBed.configureTestingModule({});
  const fixture = TestBed.createComponent(ReplayResults);
  fixture.componentRef.setInput('result', result);
  fixture.componentRef.setInput('timeZone', 'Europe/Berlin');
  await fixture.whenStable();
  return fixture.nativeElement as HTMLElement;
}

describe('ReplayResults', () => {
  it('shows the counts, each unit and kind with the run’s and the stored alarms in site time, and whether they agree', async () => {
    const el = await render(RESULT);
    expect(el.querySelector('[data-testid="replay-counts"]')!.textContent).toContain(
      '12960 reports of 3 units: the run raises 2 alarms; 3 are stored',
    );
    expect(el.querySelector('[data-testid="replay-verdicts"]')!.textContent).toContain('1 in both · 1 only in the run · 2 only stored');
    const trap = el.querySelector('[data-testid="replay-row-QHL-2402-trap"]')!;
    expect(trap.textContent).toContain('Stuck on a lesser peak');
    expect(trap.textContent).toContain('from 11:10:00 CEST');
    expect(trap.textContent).toContain('from 11:12:00 CEST to 13:00:00 CEST');
    expect(el.querySelector('[data-testid="verdict-QHL-2402-trap"]')!.textContent).toContain('Both');
    expect(el.querySelector('[data-testid="verdict-QHL-2401-drift"]')!.textContent).toContain('Only the run');
    expect(el.querySelector('[data-testid="replay-row-QHL-2403-stall"]')!.textContent).toContain(', open');
    expect(el.querySelector('[data-testid="replay-row-site-comms"]')!.textContent).toContain('Whole site');
    expect(el.querySelector('[data-testid="verdict-site-comms"]')!.textContent).toContain('Only stored');
  });

  it('says so when neither has an alarm, and when nothing was stored to read', async () => {
    const el = await render({ ...RESULT, reports: 0, alarms: [], stored: [] });
    expect(el.querySelector('[data-testid="replay-none"]')!.textContent).toContain('(no reports are stored for it)');
  });
});
