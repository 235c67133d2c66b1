import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { NgxEchartsDirective } from 'ngx-echarts';
import { readPalette } from '../live/tone-palette';
import { ColourScheme } from '../shell/colour-scheme';
import { lastHourOptions, type HourPoint } from './last-hour';

/** The unit's last hour: in-plane irradiance, output and angles, drawn in the site's zone. */
@Component({
  selector: 'bw-last-hour-panel',
  imports: [MatIconModule, MatProgressBarModule, NgxEchartsDirective],
  template: `
    <section class="panel" aria-labelledby="hour-title">
      <h2 id="hour-title">Last hour</h2>
      @if (loading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the last hour" />
      }
      @if (!loading() && points().length === 0) {
        <div class="empty-state small">
          <mat-icon aria-hidden="true">show_chart</mat-icon>
          <p>No reports in the last hour.</p>
        </div>
      } @else {
        <div
          class="hour-chart"
          echarts
          [options]="options()"
          role="img"
          aria-label="In-plane irradiance, output and angles over the last hour"
        ></div>
      }
    </section>
  `,
  styleUrl: './unit-panel.scss',
  styles: `
    .hour-chart {
      height: 420px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LastHourPanel {
  private readonly scheme = inject(ColourScheme);

  /** Reports of the last hour, oldest first. */
  readonly points = input.required<HourPoint[]>();
  readonly loading = input(false);
  readonly timeZone = input('UTC');
  /** The clock the axis ends at (the newest report when that is later). */
  readonly now = input(Date.now());

  protected readonly options = computed(() => {
    void this.scheme.current();
    return lastHourOptions(this.points(), readPalette(), this.timeZone(), Math.max(this.now(), this.points().at(-1)?.t ?? 0));
  });
}
