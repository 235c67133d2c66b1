import { Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideRouter, Router } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import type { Me } from '../../../shared/contracts/api';
import { safeReturnUrl, SignIn } from './sign-in';

@Component({ template: 'target page' })
class Target {}

const ADA: Me = { id: 1, email: 'admin@saltmarsh.example', name: 'Ada Kestrel', role: 'admin', ownerId: null };

describe('SignIn', () => {
  let harness: RouterTestingHarness;
  let http: HttpTestingController;
  let page: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([
          { path: 'sign-in', component: SignIn },
          { path: 'admin/people', component: Target },
          { path: '', component: Target },
        ]),
      ],
    });
    http = TestBed.inject(HttpTestingController);
    harness = await RouterTestingHarness.create();
    await harness.navigateByUrl('/sign-in?returnUrl=%2Fadmin%2Fpeople');
    page = harness.routeNativeElement!;
  });

  afterEach(() => http.verify());

  const input = (name: string) => page.querySelector<HTMLInputElement>(`input[formcontrolname="${name}"]`)!;
  const errors = () => [...page.querySelectorAll('mat-error')].map((e) => e.textContent!.trim());
  const problem = () => page.querySelector('[role="alert"]')?.textContent?.trim() ?? null;
  const button = () => page.querySelector<HTMLButtonElement>('button[type="submit"]')!;

  async function type(name: string, value: string): Promise<void> {
    const field = input(name);
    field.value = value;
    field.dispatchEvent(new Event('input'));
    field.dispatchEvent(new Event('blur'));
    await harness.fixture.whenStable();
  }

  async function submit(): Promise<void> {
    page.querySelector('form')!.dispatchEvent(new Event('submit'));
    await harness.fixture.whenStable();
  }

  it('shows a message under each empty field and sends nothing', async () => {
    expect(errors()).toEqual([]);
    await submit();
    expect(errors()).toEqual(['Enter your email address.', 'Enter your password.']);
    http.expectNone('/api/auth/sign-in');
  });

  it('rejects an email address without a domain', async () => {
    await type('email', 'ada');
    await type('password', 'brightward-demo');
    await submit();
    expect(errors()).toEqual(['Enter an email address like name@example.org.']);
    http.expectNone('/api/auth/sign-in');
  });

  it('signs in with the trimmed address and returns to the page asked for', async () => {
    await type('email', '  admin@saltmarsh.example ');
    await type('password', 'brightward-demo');
    await submit();
    expect(button().disabled).toBe(true);
    expect(button().textContent).toContain('Signing in');
    const request = http.expectOne('/api/auth/sign-in');
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({ email: 'admin@saltmarsh.example', password: 'brightward-demo' });
    request.flush(ADA);
    await harness.fixture.whenStable();
    expect(TestBed.inject(Router).url).toBe('/admin/people');
  });

  it('says when the credentials are wrong and lets the user try again', async () => {
    await type('email', 'admin@saltmarsh.example');
    await type('password', 'wrong-password');
    await submit();
    http
      .expectOne('/api/auth/sign-in')
      .flush(
        { error: { code: 'invalid_credentials', message: 'Invalid email or password.' } },
        { status: 401, statusText: 'Unauthorized' },
      );
    await harness.fixture.whenStable();
    expect(problem()).toContain('email address or password is not right');
    expect(button().disabled).toBe(false);
    expect(TestBed.inject(Router).url).toBe('/sign-in?returnUrl=%2Fadmin%2Fpeople');
  });

  it('asks the user to wait after too many attempts', async () => {
    await type('email', 'admin@saltmarsh.example');
    await type('password', 'wrong-password');
    await submit();
    http
      .expectOne('/api/auth/sign-in')
      .flush({ error: { code: 'too_many_attempts', message: 'Slow down.' } }, { status: 429, statusText: 'Too Many Requests' });
    await harness.fixture.whenStable();
    expect(problem()).toContain('Too many sign-in attempts. Wait a minute');
  });

  it('says when the server cannot be reached', async () => {
    await type('email', 'admin@saltmarsh.example');
    await type('password', 'brightward-demo');
    await submit();
    http.expectOne('/api/auth/sign-in').error(new ProgressEvent('error'), { status: 0, statusText: '' });
    await harness.fixture.whenStable();
    expect(problem()).toContain('cannot be reached');
  });
});

describe('safeReturnUrl', () => {
  it('follows same-site paths only', () => {
    expect(safeReturnUrl('/sites/3')).toBe('/sites/3');
    expect(safeReturnUrl('//elsewhere.example/x')).toBe('/');
    expect(safeReturnUrl('https://elsewhere.example')).toBe('/');
    expect(safeReturnUrl('/sign-in?returnUrl=%2F')).toBe('/');
    expect(safeReturnUrl(null)).toBe('/');
  });
});
