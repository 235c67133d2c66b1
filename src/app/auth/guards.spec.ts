import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter, Router, Routes } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { Me, Role } from '../../../shared/contracts/api';
import { adminRoutes } from '../admin/admin.routes';
import { routes as appRoutes } from '../app.routes';
import { authGuard } from './auth-guard';
import { authInterceptor } from './auth-interceptor';
import { roleGuard } from './role-guard';

@Component({ template: 'page' })
class Blank {}

const routes: Routes = [
  { path: 'sign-in', component: Blank },
  {
    path: '',
    canActivate: [authGuard],
    children: [
      { path: 'sites', component: Blank },
      { path: 'no-access', component: Blank },
      { path: 'admin/people', canActivate: [roleGuard], data: { roles: ['admin'] }, component: Blank },
    ],
  },
];

function me(role: Role): Me {
  return { id: 7, email: `${role}@example.org`, name: 'Test Person', role, ownerId: role === 'owner' ? 1 : null };
}

describe('route guards', () => {
  let http: HttpTestingController;
  let router: Router;
  let harness: RouterTestingHarness;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(withInterceptors([authInterceptor])), provideHttpClientTesting(), provideRouter(routes)],
    });
    http = TestBed.inject(HttpTestingController);
    router = TestBed.inject(Router);
    harness = await RouterTestingHarness.create();
  });

  afterEach(() => http.verify());

  /** Navigates, answering the one `GET /api/me` the session asks with `answer` (a user, or 401). */
  async function visit(url: string, answer: Me | 401): Promise<void> {
    const navigation = harness.navigateByUrl(url);
    await new Promise((resolve) => setTimeout(resolve));
    const request = http.expectOne('/api/me');
    if (answer === 401) {
      request.flush({ error: { code: 'unauthenticated', message: 'Sign in first.' } }, { status: 401, statusText: 'Unauthorized' });
    } else {
      request.flush(answer);
    }
    await navigation;
  }

  it('sends a signed-out visitor to sign-in, remembering the page', async () => {
    await visit('/admin/people', 401);
    expect(router.url).toBe('/sign-in?returnUrl=%2Fadmin%2Fpeople');
  });

  it('sends a signed-in technician away from an admin page to no-access', async () => {
    await visit('/admin/people', me('technician'));
    expect(router.url).toBe('/no-access');
  });

  it('sends an owner away from an admin page to no-access', async () => {
    await visit('/admin/people', me('owner'));
    expect(router.url).toBe('/no-access');
  });

  it('lets an admin open an admin page', async () => {
    await visit('/admin/people', me('admin'));
    expect(router.url).toBe('/admin/people');
  });

  it('lets any signed-in role open the sites page', async () => {
    await visit('/sites', me('crew'));
    expect(router.url).toBe('/sites');
  });

  it('asks the server only once per page load', async () => {
    await visit('/sites', me('engineer'));
    await harness.navigateByUrl('/admin/people');
    http.expectNone('/api/me');
    expect(router.url).toBe('/no-access');
  });

  it('returns to sign-in when the session ends during use (401 from the API)', async () => {
    await visit('/sites', me('engineer'));
    TestBed.inject(HttpClient)
      .get('/api/sites')
      .subscribe({ error: () => undefined });
    http.expectOne('/api/sites').flush({ error: { code: 'unauthenticated', message: 'x' } }, { status: 401, statusText: 'Unauthorized' });
    await harness.fixture.whenStable();
    expect(router.url).toBe('/sign-in?returnUrl=%2Fsites');
  });

  it('shows no-access when the API refuses the role (403)', async () => {
    await visit('/sites', me('crew'));
    TestBed.inject(HttpClient)
      .get('/api/users')
      .subscribe({ error: () => undefined });
    http.expectOne('/api/users').flush({ error: { code: 'forbidden', message: 'x' } }, { status: 403, statusText: 'Forbidden' });
    await harness.fixture.whenStable();
    expect(router.url).toBe('/no-access');
  });
});

describe('application routes', () => {
  it('guard every admin page with the admin role only', () => {
    const admin = appRoutes.find((route) => route.path === '')!.children!.find((route) => route.path === 'admin')!;
    expect(admin.data?.['roles']).toEqual(['admin']);
    const pages = adminRoutes.filter((route) => route.loadComponent);
    expect(pages.map((route) => route.path)).toEqual(['people', 'owners', 'sites', 'units', 'outbox', 'audit']);
    for (const page of pages) {
      expect(page.canActivate).toContain(roleGuard);
      expect(page.data?.['roles']).toEqual(['admin']);
    }
  });

  it('put everything but sign-in behind the auth guard', () => {
    const shell = appRoutes.find((route) => route.path === '')!;
    expect(shell.canActivate).toEqual([authGuard]);
    expect(appRoutes.filter((route) => !route.canActivate).map((route) => route.path)).toEqual(['sign-in']);
  });
});
