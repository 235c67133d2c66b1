import { DestroyRef } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter, Router } from '@angular/router';
import type { LiveServerMessage } from '../../../shared/contracts/live';
import { Session } from '../auth/session';
import { LIVE_SOCKET_FACTORY, LiveConnection, reconnectDelayMs } from './live-connection';

/** A socket the test drives by hand. */
class FakeSocket {
  static all: FakeSocket[] = [];
  readyState = 0;
  sent: unknown[] = [];
  onopen: (() => void) | null = null;
  onmessage: ((e: { data: string }) => void) | null = null;
  onclose: ((e?: { code: number }) => void) | null = null;
  constructor(readonly url: string) {
    FakeSocket.all.push(this);
  }
  send(data: string) {
    this.sent.push(JSON.parse(data));
  }
  close() {
    this.readyState = 3;
    this.onclose?.();
  }
  open() {
    this.readyState = 1;
    this.onopen?.();
  }
  drop(code = 1006) {
    this.readyState = 3;
    this.onclose?.({ code });
  }
}

class Lifetime implements DestroyRef {
  private readonly fns: (() => void)[] = [];
  destroyed = false;
  onDestroy(fn: () => void) {
    this.fns.push(fn);
    return () => undefined;
  }
  destroy() {
    this.fns.forEach((f) => f());
  }
}

describe('live connection', () => {
  beforeEach(() => {
    FakeSocket.all = [];
    vi.useFakeTimers();
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: LIVE_SOCKET_FACTORY, useValue: (url: string) => new FakeSocket(url) as unknown as WebSocket },
      ],
    });
  });
  afterEach(() => vi.useRealTimers());

  it('backs off 1, 2, 4 … seconds up to 15 s', () => {
    expect([1, 2, 3, 4, 5, 6].map(reconnectDelayMs)).toEqual([1000, 2000, 4000, 8000, 15000, 15000]);
  });

  it('subscribes on open, shows its state, and after a drop reconnects and subscribes again (fresh snapshot)', () => {
    const live = TestBed.inject(LiveConnection);
    const life = new Lifetime();
    const got: LiveServerMessage[] = [];
    live.messages.subscribe((m) => got.push(m));
    live.watch({ fleet: true }, life);
    expect(live.state()).toBe('connecting');
    const first = FakeSocket.all[0]!;
    expect(first.url).toMatch(/^ws:\/\/.*\/ws$/);
    first.open();
    expect(live.state()).toBe('live');
    expect(first.sent).toEqual([{ type: 'subscribe', fleet: true }]);
    first.onmessage!({ data: JSON.stringify({ type: 'snapshot', fleet: true, units: [] }) });
    expect(got.map((m) => m.type)).toEqual(['snapshot']);

    first.drop();
    expect(live.state()).toBe('reconnecting');
    expect(FakeSocket.all).toHaveLength(1);
    vi.advanceTimersByTime(999);
    expect(FakeSocket.all).toHaveLength(1);
    vi.advanceTimersByTime(1);
    const second = FakeSocket.all[1]!;
    second.drop(); // fails again: next wait is 2 s
    vi.advanceTimersByTime(1999);
    expect(FakeSocket.all).toHaveLength(2);
    vi.advanceTimersByTime(1);
    const third = FakeSocket.all[2]!;
    third.open();
    expect(live.state()).toBe('live');
    expect(third.sent).toEqual([{ type: 'subscribe', fleet: true }]);
  });

  it('shares one socket between watchers, unsubscribes the last one and closes when nobody watches', () => {
    const live = TestBed.inject(LiveConnection);
    const a = new Lifetime();
    const b = new Lifetime();
    live.watch({ unitId: 7 }, a);
    const s = FakeSocket.all[0]!;
    s.open();
    live.watch({ unitId: 7 }, b);
    live.watch({ siteId: 2 }, b);
    expect(FakeSocket.all).toHaveLength(1);
    expect(s.sent).toEqual([
      { type: 'subscribe', unitId: 7 },
      { type: 'subscribe', siteId: 2 },
    ]);
    b.destroy();
    expect(s.sent.at(-1)).toEqual({ type: 'unsubscribe', siteId: 2 });
    a.destroy();
    expect(s.sent.at(-1)).toEqual({ type: 'unsubscribe', unitId: 7 });
    expect(live.state()).toBe('offline');
    vi.advanceTimersByTime(60_000);
    expect(FakeSocket.all).toHaveLength(1);
  });

  it('stops reconnecting and goes to sign-in when the server ends the session (close code 4401)', () => {
    const live = TestBed.inject(LiveConnection);
    const session = TestBed.inject(Session);
    session.signIn({ email: 'tech1@saltmarsh.example', password: 'x' }).subscribe();
    TestBed.inject(HttpTestingController)
      .expectOne('/api/auth/sign-in')
      .flush({ id: 3, email: 'tech1@saltmarsh.example', name: 'Mara Okonjo', role: 'technician', ownerId: null });
    const forget = vi.spyOn(session, 'forget');
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    live.watch({ fleet: true }, new Lifetime());
    const s = FakeSocket.all[0]!;
    s.open();
    s.drop(4401);
    expect(live.state()).toBe('offline');
    expect(forget).toHaveBeenCalled();
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: { returnUrl: '/' } });
    vi.advanceTimersByTime(60_000);
    expect(FakeSocket.all).toHaveLength(1);
  });

  it('leaves the navigation to a sign-out started here when that sign-out ends the socket', () => {
    const live = TestBed.inject(LiveConnection);
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    live.watch({ fleet: true }, new Lifetime());
    FakeSocket.all[0]!.open();
    TestBed.inject(Session).signOut().subscribe();
    FakeSocket.all[0]!.drop(4401);
    expect(live.state()).toBe('offline');
    expect(navigate).not.toHaveBeenCalled();
  });
});
