import { TestBed } from '@angular/core/testing';
import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import type { ComponentFixture } from '@angular/core/testing';
import type { Me } from '../../../shared/contracts/api';
import { ChangePassword } from './change-password';
import { Session } from './session';

const CREW: Me = { id: 5, email: 'crew1@saltmarsh.example', name: 'Ines Calder', role: 'crew', ownerId: null };

describe('ChangePassword', () => {
  let fixture: ComponentFixture<ChangePassword>;
  let http: HttpTestingController;
  let page: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({ imports: [ChangePassword], providers: [provideHttpClient(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
    TestBed.inject(Session).signIn({ email: CREW.email, password: 'x' }).subscribe();
    http.expectOne('/api/auth/sign-in').flush(CREW);
    fixture = TestBed.createComponent(ChangePassword);
    page = fixture.nativeElement as HTMLElement;
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  const input = (name: string) => page.querySelector<HTMLInputElement>(`input[formcontrolname="${name}"]`)!;
  const errors = () => [...page.querySelectorAll('mat-error')].map((e) => e.textContent!.trim());
  const problem = () => page.querySelector('[data-testid="password-problem"] p')?.textContent?.trim() ?? null;
  const button = () => page.querySelector<HTMLButtonElement>('button[type="submit"]')!;

  async function type(name: string, value: string): Promise<void> {
    const field = input(name);
    field.value = value;
    field.dispatchEvent(new Event('input'));
    field.dispatchEvent(new Event('blur'));
    await fixture.whenStable();
  }

  async function fill(current: string, next: string, again = next): Promise<void> {
    await type('currentPassword', current);
    await type('newPassword', next);
    await type('repeatPassword', again);
  }

  async function submit(): Promise<void> {
    page.querySelector('form')!.dispatchEvent(new Event('submit'));
    await fixture.whenStable();
  }

  it('names whose password it changes', () => {
    expect(page.textContent).toContain('Ines Calder (crew1@saltmarsh.example)');
  });

  it('checks every field before sending: required, at least 10 characters, at most 72 bytes, repeated the same', async () => {
    await submit();
    expect(errors()).toEqual(['Current password is required.', 'New password is required.', 'The repeated password is required.']);
    await fill('old-password', 'short', 'shorter');
    await submit();
    expect(errors()).toEqual(['New password needs at least 10 characters.', 'The repeated password does not match.']);
    // 37 × 'é' is 37 characters but 74 bytes in UTF-8.
    await fill('old-password', 'é'.repeat(37));
    await submit();
    expect(errors()).toEqual(['New password may have at most 72 bytes: fewer characters when they are accented or not Latin.']);
    http.expectNone('/api/me/password');
  });

  it('sends the current and new password, shows progress, then confirms and clears the form', async () => {
    await fill('brightward-demo', 'a much better password');
    await submit();
    expect(button().disabled).toBe(true);
    expect(button().textContent).toContain('Changing');
    expect(page.querySelector('mat-progress-bar')).not.toBeNull();
    const request = http.expectOne('/api/me/password');
    expect(request.request.method).toBe('POST');
    expect(request.request.body).toEqual({ currentPassword: 'brightward-demo', newPassword: 'a much better password' });
    request.flush(null, { status: 204, statusText: 'No Content' });
    await fixture.whenStable();
    expect(page.querySelector('[data-testid="password-changed"]')!.textContent).toContain(
      'Other devices signed in as you have been signed out',
    );
    expect(input('newPassword').value).toBe('');
    expect(errors()).toEqual([]);
    expect(button().disabled).toBe(false);
  });

  it("puts the server's message under the current password when it is wrong", async () => {
    await fill('not-it-at-all', 'a much better password');
    await submit();
    http.expectOne('/api/me/password').flush(
      {
        error: {
          code: 'validation_failed',
          message: 'The current password is not right.',
          fields: { currentPassword: 'That is not your current password.' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(errors()).toEqual(['That is not your current password.']);
    expect(problem()).toContain('Some fields need attention');
    expect(page.querySelector('[data-testid="password-changed"]')).toBeNull();
  });

  it('asks the user to wait after too many wrong current passwords', async () => {
    await fill('not-it-at-all', 'a much better password');
    await submit();
    http
      .expectOne('/api/me/password')
      .flush({ error: { code: 'too_many_attempts', message: 'Slow down.' } }, { status: 429, statusText: 'Too Many Requests' });
    await fixture.whenStable();
    expect(problem()).toBe('Too many wrong current passwords. Wait a minute, then try again.');
  });
});
