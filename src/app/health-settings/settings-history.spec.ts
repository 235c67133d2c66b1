import { TestBed } from '@angular/core/testing';
import type { HealthSettingsHistory } from '../../../shared/contracts/alarms';
import { siteSettings } from '../testing/health-settings-fixtures';
import { changeText, SettingsHistory } from './settings-history';

const HISTORY: HealthSettingsHistory = {
  siteId: 1,
  total: 3,
  entries: [
    {
      at: '2026-06-21T10:15:00.000Z',
      by: { id: 2, name: 'Ravi Lindqvist' },
      reason: 'Facade traps over the winter',
      changes: [
        { key: 'trapRatio', from: null, to: 0.8 },
        { key: 'stowGustMs', from: 16, to: null },
      ],
    },
    { at: '2026-06-20T08:00:00.000Z', by: null, reason: null, changes: [] },
  ],
};

async function render(inputs: { history?: HealthSettingsHistory | null; problem?: string | null }) {
  TestBed.configureTestingModule({});
  const fixture = TestBed.createComponent(SettingsHistory);
  fixture.componentRef.setInput('history', inputs.history ?? null);
  fixture.componentRef.setInput('problem', inputs.problem ?? null);
  fixture.componentRef.setInput('settings', siteSettings());
  fixture.componentRef.setInput('timeZone', 'Europe/Berlin');
  const retried: unknown[] = [];
  fixture.componentInstance.retry.subscribe(() => retried.push(1));
  await fixture.whenStable();
  return { el: fixture.nativeElement as HTMLElement, retried };
}

describe('SettingsHistory', () => {
  it('names each change old → new with the default spelled out', () => {
    expect(changeText({ key: 'stowGustMs', from: 16, to: null }, siteSettings())).toBe('Stow above gust: 16 m/s → default (18 m/s)');
    expect(changeText({ key: 'trapRatio', from: null, to: 0.8 }, siteSettings())).toBe('Trapped below: default (0.85) → 0.8');
  });

  it('lists who, when (site time), why and what changed, newest first, and how many older ones there are', async () => {
    const { el } = await render({ history: HISTORY });
    const entries = [...el.querySelectorAll('[data-testid="history-entry"]')];
    expect(entries).toHaveLength(2);
    expect(entries[0]!.textContent).toContain('Ravi Lindqvist');
    expect(entries[0]!.textContent).toContain('21 Jun 2026, 12:15:00 CEST');
    expect(entries[0]!.textContent).toContain('Facade traps over the winter');
    expect([...entries[0]!.querySelectorAll('.changes li')].map((li) => li.textContent!.trim())).toEqual([
      'Trapped below: default (0.85) → 0.8',
      'Stow above gust: 16 m/s → default (18 m/s)',
    ]);
    expect(entries[1]!.textContent).toContain('A person no longer on record');
    expect(entries[1]!.textContent).toContain('No reason recorded');
    expect(entries[1]!.textContent).toContain('Saved without changing a value.');
    expect(el.querySelector('[data-testid="history-more"]')!.textContent).toContain('1 older change in the audit log.');
  });

  it('has loading, empty and error states; the error offers a retry', async () => {
    expect((await render({})).el.querySelector('[data-testid="history-loading"]')).not.toBeNull();
    TestBed.resetTestingModule();
    expect(
      (await render({ history: { siteId: 1, total: 0, entries: [] } })).el.querySelector('[data-testid="history-empty"]'),
    ).not.toBeNull();
    TestBed.resetTestingModule();
    const { el, retried } = await render({ problem: 'The server cannot be reached.' });
    expect(el.querySelector('[data-testid="history-problem"]')!.textContent).toContain('The server cannot be reached.');
    (el.querySelector('[data-testid="history-problem"] button') as HTMLButtonElement).click();
    expect(retried).toHaveLength(1);
  });
});
