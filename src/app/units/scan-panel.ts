import { ChangeDetectionStrategy, Component, computed, inject, input, output } from '@angular/core';
import { DecimalPipe, LowerCasePipe } from '@angular/common';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { NgxEchartsDirective } from 'ngx-echarts';
import type { ScanResult } from '../../../shared/contracts/alarms';
import type { CommandView } from '../../../shared/contracts/live';
import { readPalette } from '../live/tone-palette';
import { siteTime, utcTime } from '../live/unit-status';
import { ColourScheme } from '../shell/colour-scheme';
import { STATUS_LOOK, type CommandChoice } from './commands';
import { scanFindings, scanHeatmapOptions } from './scan-chart';

/** Scan and relocate in three steps: send a scan, read what it measured, send the unit to the brightest orientation. */
@Component({
  selector: 'bw-scan-panel',
  imports: [DecimalPipe, LowerCasePipe, MatButtonModule, MatIconModule, MatProgressBarModule, MatTooltipModule, NgxEchartsDirective],
  template: `
    <section class="panel" aria-labelledby="scan-title" data-testid="scan-panel">
      <h2 id="scan-title">Scan and relocate</h2>
      <ol class="steps">
        <li>
          <strong>Scan.</strong> The unit sweeps its range and reports what it sees, so a better orientation than where it settled can be
          found.
          <div class="step-actions">
            <button
              mat-stroked-button
              type="button"
              [disabled]="!!scanChoice().disabledReason || busy()"
              (click)="sendScan.emit()"
              data-testid="scan-send"
              [attr.aria-describedby]="scanChoice().disabledReason ? 'why-scan-step' : null"
            >
              <mat-icon>radar</mat-icon>Send a scan
            </button>
            <button mat-button type="button" (click)="showLatest.emit()" [disabled]="loading()" data-testid="scan-refresh">
              <mat-icon>refresh</mat-icon>Show the latest scan
            </button>
            @if (scanChoice().disabledReason; as why) {
              <span class="why" id="why-scan-step">{{ why }}</span>
            }
          </div>
          @if (command(); as c) {
            <!-- The full stop follows the block with no space: kept as written. -->
            <!-- prettier-ignore -->
            <p class="quiet" data-testid="scan-status"><mat-icon aria-hidden="true" class="inline">{{ statusLabel[c.status].icon }}</mat-icon>Scan {{ statusLabel[c.status].label | lowercase }}@if (c.reason) { — {{ c.reason }} }.
              @if (c.status !== 'completed' && c.status !== 'rejected' && c.status !== 'timed-out') { The result appears here when the unit reports the end of the scan. }
            </p>
          }
        </li>
        <li>
          <strong>Read the result.</strong>
          @if (loading()) {
            <mat-progress-bar mode="indeterminate" aria-label="Loading the scan" />
          }
          @if (problem(); as message) {
            <p class="quiet" data-testid="scan-problem">{{ message }}</p>
          }
          @if (scan(); as s) {
            <p class="quiet" [matTooltip]="utcTime(s.startedAt)">
              Scan started {{ siteTime(s.startedAt, timeZone(), true)
              }}{{ s.complete ? '' : ' — not finished yet; the picture may be partial' }}.
            </p>
            @if (facts(); as f) {
              <ul class="facts" data-testid="scan-facts">
                <li>{{ f.measuredBest }}</li>
                @if (f.comparison) {
                  <li>{{ f.comparison }}</li>
                } @else {
                  <li>No model to compare with for this time.</li>
                }
                <li>
                  <strong>{{ f.gain }}</strong>
                </li>
              </ul>
            }
            @if (options(); as o) {
              <div
                class="scan-chart"
                echarts
                [options]="o"
                role="img"
                [attr.aria-label]="
                  'Measured irradiance over tilt and azimuth; brightest ' +
                  (s.landscape.globalMax.wm2 | number: '1.0-0') +
                  ' W/m² at tilt ' +
                  s.landscape.globalMax.tiltDeg +
                  '°, azimuth ' +
                  s.landscape.globalMax.azimuthDeg +
                  '°'
                "
              ></div>
            }
          }
        </li>
        <li>
          <strong>Relocate.</strong>
          @if (scan(); as s) {
            Send the unit to tilt {{ s.goto.tiltDeg }}°, azimuth {{ s.goto.azimuthDeg }}°; it resumes tracking from there. You will see the
            cautions and confirm nobody is within reach.
            <div class="step-actions">
              <button
                mat-flat-button
                type="button"
                [disabled]="!!gotoChoice().disabledReason || busy()"
                (click)="gotoBrightest.emit()"
                data-testid="goto-brightest"
                [attr.aria-describedby]="gotoChoice().disabledReason ? 'why-goto-step' : null"
              >
                <mat-icon>my_location</mat-icon>Go to the brightest orientation
              </button>
              @if (gotoChoice().disabledReason; as why) {
                <span class="why" id="why-goto-step">{{ why }}</span>
              }
            </div>
          } @else {
            <span class="quiet">Available once a scan has been read.</span>
          }
        </li>
      </ol>
    </section>
  `,
  styleUrl: './unit-panel.scss',
  styles: `
    .steps {
      margin: 0;
      padding-left: 20px;
      display: grid;
      gap: 12px;
      > li {
        padding-left: 4px;
      }
    }
    .step-actions {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 12px;
      margin-top: 8px;
    }
    .facts {
      margin: 8px 0;
      padding-left: 18px;
    }
    .scan-chart {
      height: 360px;
      width: 100%;
    }
    mat-icon.inline {
      font-size: 16px;
      width: 16px;
      height: 16px;
      vertical-align: text-bottom;
      margin-right: 4px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ScanPanel {
  private readonly scheme = inject(ColourScheme);

  /** The latest scan result (or that of the scan sent from here); null when there is none yet. */
  readonly scan = input<ScanResult | null>(null);
  /** The scan command sent from this view, followed live. */
  readonly command = input<CommandView | null>(null);
  readonly loading = input(false);
  readonly problem = input<string | null>(null);
  /** The scan and go-to commands as offered to the viewer (with why not, when not). */
  readonly scanChoice = input.required<CommandChoice>();
  readonly gotoChoice = input.required<CommandChoice>();
  /** A command is on its way: buttons wait. */
  readonly busy = input(false);
  readonly timeZone = input('UTC');

  readonly sendScan = output<void>();
  readonly showLatest = output<void>();
  /** The viewer wants the unit sent to the scan's brightest orientation (after confirmation). */
  readonly gotoBrightest = output<void>();

  protected readonly facts = computed(() => {
    const s = this.scan();
    return s ? scanFindings(s) : null;
  });
  protected readonly options = computed(() => {
    void this.scheme.current();
    const s = this.scan();
    return s ? scanHeatmapOptions(s, readPalette()) : null;
  });

  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly statusLabel = STATUS_LOOK;
}
