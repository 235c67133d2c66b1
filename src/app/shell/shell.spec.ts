import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter, Router } from '@angular/router';
import type { Me, Role } from '../../../shared/contracts/api';
import { Session } from '../auth/session';
import { Shell } from './shell';

async function renderAs(role: Role) {
  TestBed.configureTestingModule({
    imports: [Shell],
    providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
  });
  const http = TestBed.inject(HttpTestingController);
  const me: Me = { id: 3, email: 'person@example.org', name: 'Mara Okonjo', role, ownerId: null };
  TestBed.inject(Session).signIn({ email: me.email, password: 'x' }).subscribe();
  http.expectOne('/api/auth/sign-in').flush(me);
  const fixture = TestBed.createComponent(Shell);
  await fixture.whenStable();
  return { fixture, http, element: fixture.nativeElement as HTMLElement };
}

describe('Shell', () => {
  it('lists only the pages a technician may use, with the name and role', async () => {
    const { element } = await renderAs('technician');
    const labels = [...element.querySelectorAll('[data-testid="main-nav"] a [matListItemTitle]')].map((s) => s.textContent!.trim());
    expect(labels).toEqual([
      'Fleet board',
      'Alarms',
      'Tickets',
      'Sites',
      'Trace explorer',
      'Health settings',
      'Detector replay',
      'Notifications',
    ]);
    expect(element.querySelector('[data-testid="role-chip"]')!.textContent).toContain('O&M technician');
    expect(element.querySelector('[data-testid="user-menu"]')!.textContent).toContain('Mara Okonjo');
    expect(element.textContent).not.toContain('Administration');
  });

  it('lists the administration pages for an admin', async () => {
    const { element } = await renderAs('admin');
    const headings = [...element.querySelectorAll('.nav-heading')].map((h) => h.textContent!.trim());
    expect(headings).toEqual(['Fleet', 'Administration']);
    const hrefs = [...element.querySelectorAll('[data-testid="main-nav"] a')].map((a) => a.getAttribute('href'));
    expect(hrefs).toEqual([
      '/fleet',
      '/alarms',
      '/tickets',
      '/sites',
      '/traces',
      '/landscape',
      '/health-settings',
      '/replay',
      '/notifications',
      '/admin/people',
      '/admin/owners',
      '/admin/sites',
      '/admin/units',
      '/admin/outbox',
      '/admin/audit',
    ]);
  });

  it('signs out through the server and goes to sign-in', async () => {
    const { fixture, http, element } = await renderAs('crew');
    const router = TestBed.inject(Router);
    const navigate = vi.spyOn(router, 'navigate').mockResolvedValue(true);
    (element.querySelector('[data-testid="user-menu"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    (document.querySelector('[data-testid="sign-out"]') as HTMLButtonElement).click();
    const request = http.expectOne('/api/auth/sign-out');
    expect(request.request.method).toBe('POST');
    request.flush(null, { status: 204, statusText: 'No Content' });
    expect(TestBed.inject(Session).me()).toBeNull();
    expect(navigate).toHaveBeenCalledWith(['/sign-in']);
  });

  it('switches colours and remembers the choice', async () => {
    localStorage.removeItem('brightward.colourScheme');
    const { fixture, element } = await renderAs('owner');
    const toggle = element.querySelector<HTMLButtonElement>('button.scheme')!;
    expect(toggle.textContent).toContain('Follow device');
    toggle.click();
    await fixture.whenStable();
    expect(document.documentElement.dataset['scheme']).toBe('light');
    expect(toggle.textContent).toContain('Light');
    toggle.click();
    await fixture.whenStable();
    expect(document.documentElement.dataset['scheme']).toBe('dark');
    expect(localStorage.getItem('brightward.colourScheme')).toBe('dark');
    toggle.click();
    await fixture.whenStable();
    expect(document.documentElement.dataset['scheme']).toBeUndefined();
  });

  it('offers every role a way to change their own password from the account menu', async () => {
    for (const role of ['owner', 'crew'] as const) {
      TestBed.resetTestingModule();
      const { fixture, element } = await renderAs(role);
      (element.querySelector('[data-testid="user-menu"]') as HTMLButtonElement).click();
      await fixture.whenStable();
      const link = document.querySelector<HTMLAnchorElement>('[data-testid="change-password"]')!;
      expect(link.textContent).toContain('Change password');
      expect(link.getAttribute('href')).toBe('/account/password');
      document.body.dispatchEvent(new KeyboardEvent('keydown', { key: 'Escape' }));
      fixture.destroy();
    }
  });
});
