import { DestroyRef } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter } from '@angular/router';
import type { AlarmView } from '../../../shared/contracts/alarms';
import { toAlarmView } from '../core/alarm-api';
import { LIVE_SOCKET_FACTORY, LiveConnection } from '../live/live-connection';
import { UnitAlarmsPanel } from './unit-alarms-panel';
import { FakeSocket, alarmView } from '../testing/spec-fixtures';

const alarm = (over: Partial<AlarmView>): AlarmView => alarmView(over);
const trap = alarm({
  id: 2,
  kind: 'trap',
  severity: 'P2',
  evidence: {
    model: { globalMax: { tiltDeg: 30, azimuthDeg: 178, wm2: 860 }, localMaxima: [{}, {}], minSinglePeakDetectorTiltDeg: 14 },
    lossWm2: 450,
    lossPct: 52.3,
  },
});

let current: HttpTestingController | null = null;

async function render(alarms: AlarmView[] | 'failing', over: { canUseTarget?: boolean; canAcknowledge?: boolean } = {}) {
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      provideRouter([]),
      { provide: LIVE_SOCKET_FACTORY, useValue: () => new FakeSocket() as unknown as WebSocket },
    ],
  });
  const http = TestBed.inject(HttpTestingController);
  current = http;
  TestBed.inject(LiveConnection).watch({ unitId: 3 }, TestBed.inject(DestroyRef));
  const fixture = TestBed.createComponent(UnitAlarmsPanel);
  fixture.componentRef.setInput('unitId', 3);
  fixture.componentRef.setInput('timeZone', 'Europe/London');
  fixture.componentRef.setInput('canUseTarget', over.canUseTarget ?? true);
  fixture.componentRef.setInput('canAcknowledge', over.canAcknowledge ?? true);
  const targets: { tiltDeg: number; azimuthDeg: number }[] = [];
  fixture.componentInstance.useTarget.subscribe((t) => targets.push(t));
  await fixture.whenStable();
  const req = http.expectOne((r) => r.url === '/api/alarms' && r.params.get('unitId') === '3');
  if (alarms === 'failing') req.flush({ error: { message: 'Server unreachable.' } }, { status: 503, statusText: 'Unavailable' });
  else req.flush(alarms);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const text = (sel: string) => el.querySelector(sel)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  return { fixture, http, el, text, targets };
}

describe('UnitAlarmsPanel', () => {
  afterEach(() => {
    current?.verify();
    current = null;
  });

  it('takes alarms from live messages and leaves wind-stow events out', () => {
    const a = {
      id: 5,
      kind: 'trap',
      severity: 'P2',
      state: 'active',
      unitId: 3,
      serial: 'S',
      siteId: 1,
      message: 'x',
      advice: '',
      evidence: {},
      firstSeenAt: '2026-01-01T00:00:00Z',
      raisedAt: '2026-01-01T00:10:00Z',
      lastSeenAt: '2026-01-01T00:20:00Z',
      clearedAt: null,
      clearReason: null,
      acknowledgedAt: null,
      acknowledgedBy: null,
    };
    expect(toAlarmView(a)).toBe(a);
    expect(
      toAlarmView({
        kind: 'wind-stow',
        severity: 'P4',
        state: 'event',
        serial: 'S',
        siteId: 1,
        at: '2026-01-01T00:00:00Z',
        event: 'stowed',
        message: 'm',
      }),
    ).toBeNull();
    expect(toAlarmView(null)).toBeNull();
  });

  it('leads with the open trap finding and offers its modelled best as the go-to target', async () => {
    const { el, text, targets } = await render([alarm({ id: 1 }), trap]);
    expect(text('#alarms-title')).toBe('Alarms (2 open)');
    expect(text('[data-testid="trap-finding"] p')).toBe(
      'Stuck on a lesser peak. The modelled brightest orientation is tilt 30°, azimuth 178° with 860 W/m². Where it points it loses 450 W/m² (52.3 %). The model shows 2 peaks. A detector tilt of 14° or more would leave one.',
    );
    expect([...el.querySelectorAll('bw-alarm-card h3')].map((h) => h.textContent!.trim())).toEqual([
      'Stuck on a lesser peak',
      'Actuator stall',
    ]);
    el.querySelector<HTMLButtonElement>('[data-testid="use-trap-target"]')!.click();
    expect(targets).toEqual([{ tiltDeg: 30, azimuthDeg: 178 }]);
  });

  it('offers no go-to target to those who may not send commands, and no finding once the trap alarm clears', async () => {
    const { fixture, el } = await render([trap], { canUseTarget: false });
    expect(el.querySelector('[data-testid="trap-finding"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="use-trap-target"]')).toBeNull();
    FakeSocket.last!.push({ type: 'alarm', alarm: { ...trap, state: 'cleared', clearedAt: '2026-06-21T10:30:00Z' } });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="trap-finding"]')).toBeNull();
    expect(el.querySelector('#alarms-title')!.textContent!.replace(/\s+/g, ' ')).toContain('(0 open)');
  });

  it('follows live alarms of this unit only', async () => {
    const { fixture, el } = await render([]);
    expect(el.textContent).toContain('No alarms for this unit.');
    FakeSocket.last!.push({ type: 'alarm', alarm: alarm({ id: 7, unitId: 4, serial: 'QHL-2402' }) });
    FakeSocket.last!.push({ type: 'alarm', alarm: alarm({ id: 8, kind: 'hunting' }) });
    await fixture.whenStable();
    expect([...el.querySelectorAll('bw-alarm-card h3')].map((h) => h.textContent!.trim())).toEqual(['Hunting']);
  });

  it('acknowledges an alarm and shows who did', async () => {
    const { fixture, http, el } = await render([alarm({ id: 4 })]);
    el.querySelector<HTMLButtonElement>('[data-testid="ack-4"]')!.click();
    http
      .expectOne({ method: 'POST', url: '/api/alarms/4/acknowledge' })
      .flush(alarm({ id: 4, acknowledgedAt: '2026-06-21T10:05:00Z', acknowledgedBy: 'Mara Okonjo' }));
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="alarm-status-4"]')!.textContent).toContain('Acknowledged by Mara Okonjo');
    expect(el.querySelector('[data-testid="ack-4"]')).toBeNull();
  });

  it('says why when the alarms cannot be read', async () => {
    const { text } = await render('failing');
    expect(text('[data-testid="unit-alarms-unavailable"] p')).toBe('Alarms could not be loaded. Server unreachable.');
  });
});
