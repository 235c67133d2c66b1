import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter, Router } from '@angular/router';
import type { NotificationList, NotificationView } from '../../../shared/contracts/notifications';
import { LIVE_SOCKET_FACTORY } from '../live/live-connection';
import { NotificationBell } from './notification-bell';

/** A live socket the spec drives by hand. */
class FakeSocket {
  static last: FakeSocket | null = null;
  readyState = 0;
  onopen: (() => void) | null = null;
  onmessage: ((e: { data: string }) => void) | null = null;
  onclose: (() => void) | null = null;
  sent: string[] = [];
  constructor() {
    FakeSocket.last = this;
  }
  send(data: string): void {
    this.sent.push(data);
  }
  close(): void {}
  open(): void {
    this.readyState = 1;
    this.onopen?.();
  }
  push(msg: unknown): void {
    this.onmessage?.({ data: JSON.stringify(msg) });
  }
}

const note = (over: Partial<NotificationView>): NotificationView => ({
  id: 1,
  kind: 'assigned',
  title: 'Ticket 12 (P2) assigned to you: Tilt drive noisy',
  body: 'Hello',
  ticketId: 12,
  siteId: 1,
  createdAt: '2026-12-03T07:00:00Z',
  readAt: null,
  ...over,
});

let http: HttpTestingController;

async function render(first: NotificationList) {
  FakeSocket.last = null;
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      provideRouter([]),
      { provide: LIVE_SOCKET_FACTORY, useValue: () => new FakeSocket() as unknown as WebSocket },
    ],
  });
  http = TestBed.inject(HttpTestingController);
  const fixture = TestBed.createComponent(NotificationBell);
  fixture.detectChanges();
  http.expectOne('/api/notifications?limit=20').flush(first);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const bell = () => el.querySelector<HTMLButtonElement>('[data-testid="notification-bell"]')!;
  const badge = () => el.querySelector('.mat-badge-content');
  return { fixture, el, bell, badge };
}

describe('NotificationBell', () => {
  afterEach(() => http.verify());

  it('shows the unread count from the server, then follows the live socket', async () => {
    const { fixture, bell, badge } = await render({ unread: 2, items: [note({ id: 1 }), note({ id: 2 })] });
    expect(bell().getAttribute('aria-label')).toBe('Notifications: 2 unread');
    expect(badge()!.textContent!.trim()).toBe('2');

    // The socket opens: whatever came while it was down is loaded again.
    FakeSocket.last!.open();
    fixture.detectChanges();
    http.expectOne('/api/notifications?limit=20').flush({ unread: 2, items: [note({ id: 1 }), note({ id: 2 })] });
    await fixture.whenStable();
    // The bell subscribes to no topic: the socket carries the person's own messages anyway.
    expect(FakeSocket.last!.sent).toEqual([]);

    FakeSocket.last!.push({ type: 'notification', notification: note({ id: 3, kind: 'p1-page', title: 'P1 at Harbour Roof' }), unread: 3 });
    fixture.detectChanges();
    await fixture.whenStable();
    expect(bell().getAttribute('aria-label')).toBe('Notifications: 3 unread');
    expect(badge()!.textContent!.trim()).toBe('3');
    expect(bell().classList).not.toContain('mat-badge-hidden');

    // Read elsewhere (another tab): the count drops to none and the badge hides.
    FakeSocket.last!.push({ type: 'notification', notification: null, unread: 0 });
    fixture.detectChanges();
    await fixture.whenStable();
    expect(bell().getAttribute('aria-label')).toBe('Notifications: none unread');
    expect(bell().classList).toContain('mat-badge-hidden');
  }, 20_000);

  it('lists the latest in its menu; opening one marks it read and goes to its ticket', async () => {
    const { fixture, bell } = await render({ unread: 1, items: [note({ id: 7, ticketId: 12 })] });
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    bell().click();
    fixture.detectChanges();
    await fixture.whenStable();
    const item = document.querySelector<HTMLButtonElement>('[data-testid="notification-7"]')!;
    expect(item.textContent).toContain('Ticket 12 (P2) assigned to you: Tilt drive noisy');
    expect(item.textContent).toContain('unread');
    item.click();
    const read = http.expectOne('/api/notifications/7/read');
    expect(read.request.method).toBe('POST');
    read.flush(note({ id: 7, readAt: '2026-12-03T07:05:00Z' }));
    expect(navigate).toHaveBeenCalledWith(['/tickets', 12]);
  });

  it('says when there is nothing, and when the list could not be loaded', async () => {
    const { fixture, bell } = await render({ unread: 0, items: [] });
    bell().click();
    fixture.detectChanges();
    await fixture.whenStable();
    expect(document.querySelector('[data-testid="bell-empty"]')!.textContent).toContain('Nothing yet');
    FakeSocket.last!.open();
    fixture.detectChanges();
    http
      .expectOne('/api/notifications?limit=20')
      .flush({ error: { code: 'unavailable', message: 'Database down.' } }, { status: 503, statusText: 'x' });
    fixture.detectChanges();
    await fixture.whenStable();
    expect(document.querySelector('[data-testid="bell-problem"]')!.textContent).toContain('Database down.');
  });
});
