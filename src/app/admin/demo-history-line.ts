import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, signal } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { DemoHistoryView } from '../../../shared/contracts/demo-history';
import { DemoHistoryApi } from '../core/demo-history-api';

/** How often the line asks again while the past is still filling [ms]. */
export const DEMO_HISTORY_POLL_MS = 10_000;

/**
 * One line on the admin pages about the demo's generated past: shown while the full-rate days still fill in the
 * background (with a bar), or when the fill failed; nothing once it is complete or when there is no generated past.
 */
@Component({
  selector: 'bw-demo-history-line',
  imports: [MatIconModule, MatProgressBarModule],
  template: `
    @if (line(); as l) {
      <div class="notice" [class.problem]="l.failed" role="status" aria-live="polite">
        <mat-icon aria-hidden="true">{{ l.failed ? 'error' : 'history' }}</mat-icon>
        <p>{{ l.text }}</p>
      </div>
      @if (!l.failed) {
        <mat-progress-bar mode="determinate" [value]="l.percent" aria-label="Demo past at full rate" />
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DemoHistoryLine {
  private readonly api = inject(DemoHistoryApi);
  private readonly view = signal<DemoHistoryView | null>(null);
  private timer: ReturnType<typeof setTimeout> | undefined;

  protected readonly line = computed(() => {
    const v = this.view();
    if (!v) return null;
    if (v.state === 'failed') return { failed: true, percent: 0, text: `The demo's past could not be generated: ${v.message}` };
    if (v.state !== 'loading' && v.state !== 'background') return null;
    return {
      failed: false,
      percent: v.daysTotal ? Math.round((100 * v.daysDone) / v.daysTotal) : 0,
      text: `Demo past: ${v.daysDone} of ${v.daysTotal} days at full rate loaded; the rest fills in the background (rollups of the whole past are already there).`,
    };
  });

  constructor() {
    inject(DestroyRef).onDestroy(() => clearTimeout(this.timer));
    this.load();
  }

  private load(): void {
    this.api.current().subscribe({
      next: (v) => {
        this.view.set(v);
        if (v.state === 'loading' || v.state === 'background') this.timer = setTimeout(() => this.load(), DEMO_HISTORY_POLL_MS);
      },
      // Not a reason to bother an admin on the people page: the line stays away.
      error: () => this.view.set(null),
    });
  }
}
