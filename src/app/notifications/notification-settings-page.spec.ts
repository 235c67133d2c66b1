import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { Me, Role } from '../../../shared/contracts/api';
import type { OnCallRota } from '../../../shared/contracts/notifications';
import { Session } from '../auth/session';
import { NotificationSettingsPage } from './notification-settings-page';

let http: HttpTestingController;
const HOUR = 3600_000;

async function renderAs(role: Role, rota?: OnCallRota) {
  TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
  http = TestBed.inject(HttpTestingController);
  const me: Me = { id: 3, email: 'tech1@saltmarsh.example', name: 'Mara Okonjo', role, ownerId: null };
  TestBed.inject(Session).signIn({ email: me.email, password: 'x' }).subscribe();
  http.expectOne('/api/auth/sign-in').flush(me);
  const fixture = TestBed.createComponent(NotificationSettingsPage);
  fixture.detectChanges();
  http.expectOne('/api/sites').flush([{ id: 1, name: 'Harbour Roof' }]);
  http
    .expectOne('/api/me/notification-settings')
    .flush({ siteIds: null, severities: ['P1', 'P2', 'P3', 'P4'], email: true, dashboard: true });
  if (rota) http.expectOne('/api/on-call').flush(rota);
  fixture.detectChanges();
  await fixture.whenStable();
  return { fixture, el: fixture.nativeElement as HTMLElement };
}

describe('NotificationSettingsPage', () => {
  afterEach(() => http.verify());

  it('saves the chosen severities and ways, and shows the field the server refused', async () => {
    const { fixture, el } = await renderAs('crew');
    expect(el.textContent).not.toContain('On-call rota');
    const boxes = [...el.querySelectorAll<HTMLInputElement>('mat-checkbox input')];
    expect(boxes.map((b) => b.checked)).toEqual([true, true, true, true]);
    boxes[3]!.click(); // P4 off
    el.querySelector<HTMLButtonElement>('[data-testid="save-settings"]')!.click();
    const put = http.expectOne('/api/me/notification-settings');
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({ siteIds: null, severities: ['P1', 'P2', 'P3'], email: true, dashboard: true });
    put.flush(
      { error: { code: 'validation_failed', message: 'No such site.', fields: { severities: 'Choose at least one severity.' } } },
      { status: 400, statusText: 'x' },
    );
    fixture.detectChanges();
    await fixture.whenStable();
    expect(el.querySelector('.field-problem')!.textContent).toContain('Choose at least one severity.');
  }, 20_000);

  it('shows the control room the rota, with who is on call now, and saves it whole', async () => {
    const now = Date.now();
    const entry = {
      id: 1,
      userId: 3,
      userName: 'Mara Okonjo',
      role: 'technician',
      siteId: null,
      siteName: null,
      from: new Date(now - HOUR).toISOString(),
      to: new Date(now + HOUR).toISOString(),
    };
    const { fixture, el } = await renderAs('technician', {
      entries: [entry],
      now: [entry],
      candidates: [{ id: 3, name: 'Mara Okonjo', role: 'technician' }],
    });
    const rota = el.querySelector('[data-testid="rota"]')!;
    expect(rota.textContent).toContain('Mara Okonjo');
    expect(rota.textContent).toContain('Whole fleet');
    expect(rota.textContent).toContain('on call now');
    el.querySelector<HTMLButtonElement>('[data-testid="save-rota"]')!.click();
    const put = http.expectOne('/api/on-call');
    expect(put.request.body).toEqual({ entries: [{ userId: 3, siteId: null, from: entry.from, to: entry.to }] });
    put.flush({ entries: [], now: [], candidates: [] });
    fixture.detectChanges();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="rota"]')!.textContent).toContain('Nobody is on the rota');
  });
});
