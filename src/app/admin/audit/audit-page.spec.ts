import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, TestRequest } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatTooltipHarness } from '@angular/material/tooltip/testing';
import type { AuditLogEntry, AuditPage as Page } from '../../../../shared/contracts/audit';
import { AuditPage, VIEWER_TIME_ZONE } from './audit-page';
import { actionLook, detailText } from './audit-words';

const entry = (over: Partial<AuditLogEntry>): AuditLogEntry => ({
  id: 1,
  at: '2026-06-21T09:00:00.000Z',
  user: { id: 3, name: 'Mara Okonjo', email: 'tech1@saltmarsh.example' },
  action: 'alarm-acknowledge',
  target: 'alarm:40',
  targetLabel: 'Alarm on QHL-2401 (actuator stall)',
  detail: { kind: 'stall', severity: 'P2', serial: 'QHL-2401' },
  ...over,
});
const page = (entries: AuditLogEntry[], total = entries.length, offset = 0): Page => ({ total, limit: 50, offset, entries });

let http: HttpTestingController;

async function render(first: Page) {
  TestBed.configureTestingModule({
    providers: [provideHttpClient(), provideHttpClientTesting(), { provide: VIEWER_TIME_ZONE, useValue: 'Europe/London' }],
  });
  http = TestBed.inject(HttpTestingController);
  const fixture = TestBed.createComponent(AuditPage);
  fixture.detectChanges();
  expectAudit({ limit: '50', offset: '0' }).flush(first);
  http.expectOne('/api/users').flush([
    {
      id: 3,
      email: 'tech1@saltmarsh.example',
      name: 'Mara Okonjo',
      role: 'technician',
      ownerId: null,
      disabled: false,
      createdAt: '2026-01-01T00:00:00Z',
    },
  ]);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const text = (testId: string) => el.querySelector(`[data-testid="${testId}"]`)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  return { fixture, el, text };
}

/** The one pending audit request, checked to carry exactly these query parameters. */
function expectAudit(params: Record<string, string>): TestRequest {
  const req = http.expectOne((r) => r.url === '/api/audit');
  const sent = Object.fromEntries(req.request.params.keys().map((k) => [k, req.request.params.get(k)]));
  expect(sent).toEqual(params);
  return req;
}

describe('AuditPage', () => {
  afterEach(() => http.verify());

  it("shows each entry with the time in the reader's zone, who, the action in words, the target and the detail", async () => {
    const { el, text } = await render(page([entry({})]));
    // 09:00 UTC is 10:00 in London in June.
    expect(text('at-1')).toContain('10:00:00');
    expect(text('action-1')).toBe('done_allAcknowledged an alarm');
    expect(text('target-1')).toBe('Alarm on QHL-2401 (actuator stall)');
    expect(text('detail-1')).toBe('P2 Actuator stall');
    expect(el.textContent).toContain('Mara Okonjo');
    expect(el.textContent).toContain('Europe/London');
  }, 20_000); // the first test of the file also pays for compiling the page

  it('shows the UTC instant when the time is hovered', async () => {
    const { fixture } = await render(page([entry({})]));
    const tooltip = await TestbedHarnessEnvironment.loader(fixture).getHarness(
      MatTooltipHarness.with({ selector: '[data-testid="at-1"]' }),
    );
    await tooltip.show();
    expect(await tooltip.getTooltipText()).toBe('2026-06-21 09:00:00 UTC');
  }, 20_000);

  it('filters by a person or a target from the row, and pages on the server', async () => {
    const { fixture, el } = await render(page([entry({})], 120));
    (el.querySelector('td button.link') as HTMLButtonElement).click();
    expectAudit({ userId: '3', limit: '50', offset: '0' }).flush(page([entry({})], 120));
    await fixture.whenStable();
    (el.querySelector('[data-testid="target-1"] button') as HTMLButtonElement).click();
    expectAudit({ userId: '3', target: 'alarm:40', limit: '50', offset: '0' }).flush(page([entry({})], 120));
    await fixture.whenStable();
    (el.querySelector('button.mat-mdc-paginator-navigation-next') as HTMLButtonElement).click();
    expectAudit({ userId: '3', target: 'alarm:40', limit: '50', offset: '50' }).flush(page([entry({ id: 2 })], 120, 50));
    await fixture.whenStable();
    expect(el.querySelector('.mat-mdc-paginator-range-label')!.textContent).toContain('51 – 100 of 120');
    (el.querySelector('[data-testid="clear-filters"]') as HTMLButtonElement).click();
    expectAudit({ limit: '50', offset: '0' }).flush(page([]));
  });

  it("sends the time range as UTC instants read in the reader's zone", async () => {
    const { fixture, el } = await render(page([entry({})]));
    const from = el.querySelector('[data-testid="filter-from"]') as HTMLInputElement;
    from.value = '2026-06-21T10:00';
    from.dispatchEvent(new Event('change'));
    const req = http.expectOne((r) => r.url === '/api/audit');
    expect(Date.parse(req.request.params.get('from')!)).toBe(new Date('2026-06-21T10:00').getTime());
    req.flush(page([]));
    await fixture.whenStable();
  });

  it('says when the log is empty, and when nothing matches the filters', async () => {
    const { fixture, text } = await render(page([]));
    expect(text('audit-empty')).toBe('The audit log is empty.');
    fixture.componentInstance['setFilter']('action', 'trace-export');
    expectAudit({ action: 'trace-export', limit: '50', offset: '0' }).flush(page([]));
    await fixture.whenStable();
    expect(text('audit-empty')).toBe('No entries match these filters.');
  });

  it("shows an error with a retry, and the server's message under the filter it names", async () => {
    const { fixture, el, text } = await render(page([entry({})]));
    fixture.componentInstance['setFilter']('target', 'x'.repeat(200));
    expectAudit({ target: 'x'.repeat(200), limit: '50', offset: '0' }).flush(
      {
        error: {
          code: 'validation_failed',
          message: 'The request has 1 invalid field(s): target.',
          fields: { target: 'Must be at most 128 characters.' },
        },
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')!.textContent).toContain('The audit log could not be loaded.');
    expect(el.querySelector('.field-problem')!.textContent).toContain('Must be at most 128 characters.');
    expect(text('audit-empty')).toBe('Nothing to show until the log can be read.');
    fixture.componentInstance['setFilter']('target', '');
    expectAudit({ limit: '50', offset: '0' }).flush(
      { error: { code: 'db', message: 'Database unavailable.' } },
      { status: 503, statusText: 'x' },
    );
    await fixture.whenStable();
    (el.querySelector('[data-testid="retry"]') as HTMLButtonElement).click();
    expectAudit({ limit: '50', offset: '0' }).flush(page([entry({ id: 9 })]));
    await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')).toBeNull();
    expect(text('action-9')).toContain('Acknowledged an alarm');
  });
});

describe('audit words', () => {
  it('names known actions in plain words and shows new ones by name', () => {
    expect(actionLook('trace-export').label).toBe('Exported traces as CSV');
    expect(actionLook('health-settings-update').label).toBe('Changed health settings');
    expect(actionLook('hold-release').label).toBe('Released a maintenance hold');
    expect(actionLook('ticket-reopen')).toEqual({ label: 'Ticket reopen', icon: 'history' });
  });

  it('shows a settings change as before → after, an export as its range, a command by kind and parameters', () => {
    const time = (iso: string) => `<${iso.slice(11, 16)}>`;
    expect(
      detailText(
        entry({ action: 'health-settings-update', detail: { before: { stowGustMs: 16 }, after: { stowGustMs: 15, trapRatio: 0.8 } } }),
        time,
      ),
    ).toBe('stow gust [m/s] 16 → 15 · trap ratio default → 0.8');
    expect(detailText(entry({ action: 'health-settings-update', detail: { before: { a: 1 }, after: { a: 1 } } }), time)).toBe('No change');
    expect(
      detailText(
        entry({ action: 'health-settings-update', detail: { before: {}, after: { stowGustMs: 16 }, reason: 'Gusty roof edge' } }),
        time,
      ),
    ).toBe('stow gust [m/s] default → 16 — why: Gusty roof edge');
    expect(
      detailText(
        entry({ action: 'trace-export', detail: { serial: 'QHL-2401', from: '2026-06-10T08:00:00.000Z', to: '2026-06-10T09:00:00.000Z' } }),
        time,
      ),
    ).toBe('<08:00> to <09:00>');
    expect(detailText(entry({ action: 'command', detail: { commandId: 'c1', kind: 'goto', tiltDeg: 30, azimuthDeg: 180 } }), time)).toBe(
      'Go to orientation (tilt [°] 30, azimuth [°] 180)',
    );
    expect(detailText(entry({ action: 'sign-in', detail: { address: '127.0.0.1' } }), time)).toBe('from 127.0.0.1');
    expect(
      detailText(
        entry({
          action: 'command-refused',
          detail: { kind: 'release-stow', status: 409, code: 'on_hold', message: 'The unit is on hold.' },
        }),
        time,
      ),
    ).toBe('Release stow: The unit is on hold.');
    expect(detailText(entry({ action: 'unit-update', detail: { detectorTiltDeg: 12, planXM: 3 } }), time)).toBe(
      'detector tilt [°] 12 · plan x [m] 3',
    );
    expect(detailText(entry({ action: 'user-update', detail: { role: 'crew', disabled: true } }), time)).toBe('role crew · disabled true');
    expect(detailText(entry({ action: 'user-password-reset', detail: null }), time)).toBe('');
  });
});
