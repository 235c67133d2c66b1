import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { OutboxMessage } from '../../../../shared/contracts/mail';
import { OutboxPage } from './outbox-page';

const message = (over: Partial<OutboxMessage>): OutboxMessage => ({
  id: 1,
  kind: 'assigned',
  to: ['crew1@saltmarsh.example'],
  subject: 'Ticket 12 (P2) assigned to you: Tilt drive noisy',
  body: 'Hello Ines Calder,\n\nMara Okonjo has sent you to unit QHL-2404.',
  attachments: [],
  status: 'sent',
  attempts: 1,
  lastError: null,
  createdAt: '2026-12-03T07:00:00Z',
  sentAt: '2026-12-03T07:00:01Z',
  ...over,
});

let http: HttpTestingController;

function render() {
  TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
  http = TestBed.inject(HttpTestingController);
  const fixture = TestBed.createComponent(OutboxPage);
  fixture.detectChanges();
  const el = fixture.nativeElement as HTMLElement;
  const text = (testId: string) => el.querySelector(`[data-testid="${testId}"]`)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  return { fixture, el, text };
}

describe('OutboxPage', () => {
  afterEach(() => http.verify());

  it('shows loading, then each message with recipients, subject, body, delivery and attachments', async () => {
    const { fixture, el, text } = render();
    expect(el.querySelector('mat-progress-bar')).not.toBeNull();
    http
      .expectOne('/api/mail/outbox?limit=500')
      .flush([
        message({ id: 2, status: 'failed', attempts: 4, lastError: '451 Mailbox busy', attachments: ['statement-2026-11.pdf'] }),
        message({ id: 1 }),
      ]);
    fixture.detectChanges();
    await fixture.whenStable();
    expect(el.querySelector('mat-progress-bar')).toBeNull();
    expect(text('to-1')).toBe('crew1@saltmarsh.example');
    expect(text('message-1')).toContain('Ticket 12 (P2) assigned to you: Tilt drive noisy');
    expect(el.querySelector('[data-testid="message-1"] pre')!.textContent).toBe(
      'Hello Ines Calder,\n\nMara Okonjo has sent you to unit QHL-2404.',
    );
    expect(text('status-1')).toBe('mark_email_readSent (1 try)');
    expect(text('status-2')).toMatch(/^errorNot delivered \(4 tries\)/);
    expect(el.querySelector('[data-testid="status-2"] .error-text')!.textContent).toBe('451 Mailbox busy');
    expect(el.querySelector('[data-testid="status-1"] .error-text')).toBeNull();
    expect(text('attachments-2')).toBe('statement-2026-11.pdf');
    expect(text('attachments-1')).toBe('None');
  }, 20_000);

  it('says when nothing has been sent, and asks the server for one delivery status when filtered', async () => {
    const { fixture, text } = render();
    http.expectOne('/api/mail/outbox?limit=500').flush([]);
    fixture.detectChanges();
    await fixture.whenStable();
    expect(text('outbox-empty')).toBe('No e-mail has been sent yet.');
  });

  it('says why the outbox could not be loaded and tries again on request', async () => {
    const { fixture, el, text } = render();
    http
      .expectOne('/api/mail/outbox?limit=500')
      .flush({ error: { code: 'forbidden', message: 'Your role may not do this.' } }, { status: 403, statusText: 'x' });
    fixture.detectChanges();
    await fixture.whenStable();
    expect(text('outbox-problem')).toContain('The outbox could not be loaded. Your role may not do this.');
    expect(text('outbox-empty')).toBeNull();
    el.querySelector<HTMLButtonElement>('[data-testid="retry"]')!.click();
    http.expectOne('/api/mail/outbox?limit=500').flush([message({ id: 5 })]);
    fixture.detectChanges();
    await fixture.whenStable();
    expect(text('outbox-problem')).toBeNull();
    expect(text('to-5')).toBe('crew1@saltmarsh.example');
  });
});
