import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { DemoHistoryView } from '../../../shared/contracts/demo-history';
import { DemoHistoryLine } from './demo-history-line';

const view = (over: Partial<DemoHistoryView>): DemoHistoryView => ({
  state: 'background',
  daysTotal: 7,
  daysDone: 3,
  message: '3 of 7 days at full rate',
  plannedAt: '2026-12-03T07:00:00.000Z',
  updatedAt: '2026-12-03T07:01:00.000Z',
  ...over,
});

function render(v: DemoHistoryView) {
  TestBed.configureTestingModule({ providers: [provideHttpClient(), provideHttpClientTesting()] });
  const http = TestBed.inject(HttpTestingController);
  const fixture = TestBed.createComponent(DemoHistoryLine);
  fixture.detectChanges();
  http.expectOne('/api/demo-history').flush(v);
  fixture.detectChanges();
  return { el: fixture.nativeElement as HTMLElement, fixture };
}

describe('DemoHistoryLine', () => {
  afterEach(() => TestBed.resetTestingModule());

  it('says how many full-rate days are loaded while the rest fills, with the bar at that share', () => {
    const { el, fixture } = render(view({}));
    expect(el.querySelector('[role="status"]')?.textContent).toContain('3 of 7 days at full rate loaded');
    expect(el.querySelector('mat-progress-bar')?.getAttribute('aria-valuenow')).toBe('43');
    fixture.destroy();
  });

  it('shows nothing once the past is complete', () => {
    const { el } = render(view({ state: 'done', daysDone: 7 }));
    expect(el.querySelector('[role="status"]')).toBeNull();
    expect(el.querySelector('mat-progress-bar')).toBeNull();
  });

  it('says when the fill failed, with its message', () => {
    const { el } = render(view({ state: 'failed', message: 'failed: the database went away' }));
    expect(el.querySelector('[role="status"]')?.textContent).toContain('could not be generated: failed: the database went away');
  });
});
