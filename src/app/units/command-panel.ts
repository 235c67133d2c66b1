import { ChangeDetectionStrategy, Component, computed, input, model, output, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import type { UnitConfig } from '../../../shared/contracts/wire';
import { WIRE_RANGES } from '../../../shared/contracts/wire-format';
import type { CommandChoice } from './commands';

/** The ranges the settings form accepts, as the unit takes them. */
const SETTING_RANGES: Record<keyof UnitConfig, readonly [min: number, max: number]> = {
  detectorTiltDeg: WIRE_RANGES.detectorTiltDeg,
  gain: WIRE_RANGES.gain,
  deadbandWm2: WIRE_RANGES.deadbandWm2,
  reportIntervalS: WIRE_RANGES.reportIntervalS,
};

/**
 * The settings to send from the form: only the fields filled in, or null when none is or one is out of range.
 * An empty number field reads as null (or '' while being edited).
 */
export function settingsFromForm(fields: Record<keyof UnitConfig, number | null>): UnitConfig | null {
  const c: UnitConfig = {};
  const put = (k: keyof UnitConfig): boolean => {
    const v = fields[k];
    const [min, max] = SETTING_RANGES[k];
    if (v === null || v === undefined || (v as unknown) === '') return true;
    if (!Number.isFinite(v) || v < min || v > max) return false;
    c[k] = v;
    return true;
  };
  const ok = put('detectorTiltDeg') && put('gain') && put('deadbandWm2') && put('reportIntervalS');
  return ok && Object.keys(c).length ? c : null;
}

/** Commands for one unit: the go-to target, one button per command with why it is not offered, and the settings form. */
@Component({
  selector: 'bw-command-panel',
  imports: [FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, RouterLink],
  template: `
    <section class="panel" aria-labelledby="cmd-title">
      <h2 id="cmd-title">Commands</h2>
      @if (offline()) {
        <div class="notice caution" role="status" data-testid="offline-notice">
          <mat-icon aria-hidden="true">cloud_off</mat-icon>
          <p>
            {{ serial() }} is offline. Commands wait in the queue; motion and settings expire if the unit does not reconnect in time. A hold
            is in force as soon as it is placed.
          </p>
        </div>
      }
      <div class="goto" role="group" aria-label="Go to target">
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>Tilt</mat-label>
          <input matInput type="number" min="0" max="90" step="1" [ngModel]="gotoTilt()" (ngModelChange)="gotoTilt.set($event)" />
          <span matTextSuffix>°</span>
        </mat-form-field>
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>Azimuth</mat-label>
          <input matInput type="number" min="0" max="360" step="1" [ngModel]="gotoAzimuth()" (ngModelChange)="gotoAzimuth.set($event)" />
          <span matTextSuffix>°</span>
        </mat-form-field>
      </div>
      <p class="hint">Go to starts at the modelled best; azimuth clockwise from north.</p>
      <ul class="commands">
        @for (c of choices(); track c.kind) {
          <li>
            <button
              mat-stroked-button
              type="button"
              [disabled]="!!c.disabledReason || busy()"
              (click)="send.emit(c)"
              [attr.data-testid]="'cmd-' + c.kind"
              [attr.aria-describedby]="c.disabledReason ? 'why-' + c.kind : null"
            >
              <mat-icon>{{ c.icon }}</mat-icon>{{ c.label }}
            </button>
            @if (c.disabledReason) {
              <span class="why" [id]="'why-' + c.kind">{{ c.disabledReason }}</span>
            } @else if (c.motion) {
              <span class="why">Moves the unit; you will be asked to confirm.</span>
            } @else if (c.kind === 'release-hold') {
              <span class="why">The unit may move at once if yours is the last hold; you will be asked to confirm.</span>
            }
          </li>
        }
      </ul>
      @if (canConfigure()) {
        <form
          class="settings"
          (submit)="$event.preventDefault(); sendSettings()"
          aria-labelledby="settings-title"
          data-testid="settings-form"
        >
          <h3 id="settings-title">Unit settings</h3>
          <p class="hint">Fill in only what should change; the unit keeps the rest.</p>
          @if (tuneSiteId() !== null) {
            <p class="hint" data-testid="site-tilt-link">
              The detector tilt this site needs over the year, for all its units at once:
              <a routerLink="/health-settings" [queryParams]="{ site: tuneSiteId() }">Health settings</a>.
            </p>
          }
          <div class="setting-fields">
            <mat-form-field subscriptSizing="dynamic">
              <mat-label>Detector tilt</mat-label>
              <input
                matInput
                type="number"
                min="0.5"
                max="45"
                step="0.5"
                name="detectorTiltDeg"
                [ngModel]="cfgDetectorTilt()"
                (ngModelChange)="cfgDetectorTilt.set($event)"
              />
              <span matTextSuffix>°</span>
            </mat-form-field>
            <mat-form-field subscriptSizing="dynamic">
              <mat-label>Gain</mat-label>
              <input
                matInput
                type="number"
                min="0.001"
                max="100"
                step="0.1"
                name="gain"
                [ngModel]="cfgGain()"
                (ngModelChange)="cfgGain.set($event)"
              />
            </mat-form-field>
            <mat-form-field subscriptSizing="dynamic">
              <mat-label>Deadband</mat-label>
              <input
                matInput
                type="number"
                min="0"
                max="500"
                step="1"
                name="deadbandWm2"
                [ngModel]="cfgDeadband()"
                (ngModelChange)="cfgDeadband.set($event)"
              />
              <span matTextSuffix>W/m²</span>
            </mat-form-field>
            <mat-form-field subscriptSizing="dynamic">
              <mat-label>Report interval</mat-label>
              <input
                matInput
                type="number"
                min="1"
                max="3600"
                step="1"
                name="reportIntervalS"
                [ngModel]="cfgReportInterval()"
                (ngModelChange)="cfgReportInterval.set($event)"
              />
              <span matTextSuffix>s</span>
            </mat-form-field>
          </div>
          <div class="step-actions">
            <button
              mat-stroked-button
              type="submit"
              [disabled]="!settings() || busy()"
              data-testid="cmd-configure"
              aria-describedby="why-configure"
            >
              <mat-icon>tune</mat-icon>Send settings
            </button>
            <span class="why" id="why-configure">{{
              settings()
                ? 'Changes how the unit moves; you will be asked to confirm.'
                : 'Detector tilt 0.5–45°, gain 0.001–100, deadband 0–500 W/m², report interval 1–3600 s.'
            }}</span>
          </div>
        </form>
      }
    </section>
  `,
  styleUrl: './unit-panel.scss',
  styles: `
    .goto {
      display: flex;
      gap: 12px;
      flex-wrap: wrap;
      mat-form-field {
        width: 130px;
      }
    }
    .commands {
      list-style: none;
      padding: 0;
      margin: 8px 0 0;
      display: grid;
      gap: 8px;
      li {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 4px 12px;
      }
      button {
        min-width: 240px;
        justify-content: flex-start;
      }
    }
    .step-actions {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 12px;
      margin-top: 8px;
    }
    .settings {
      margin-top: 16px;
      padding-top: 8px;
      border-top: 1px solid var(--mat-sys-outline-variant);
      h3 {
        font: var(--mat-sys-title-small);
        margin: 0 0 4px;
      }
    }
    .setting-fields {
      display: flex;
      flex-wrap: wrap;
      gap: 8px 12px;
      mat-form-field {
        width: 150px;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CommandPanel {
  readonly serial = input.required<string>();
  /** Whether the unit has reported and is offline now (commands then wait in the queue). */
  readonly offline = input(false);
  readonly choices = input.required<CommandChoice[]>();
  /** A command is on its way: buttons wait. */
  readonly busy = input(false);
  /** Whether the viewer may send new settings. */
  readonly canConfigure = input(false);
  /** The unit's site, when the viewer may work out and send the site's detector tilt (a link to it); null otherwise. */
  readonly tuneSiteId = input<number | null>(null);
  /** The go-to target; the view starts it at the modelled best and a trap finding may set it. */
  readonly gotoTilt = model<number | null>(null);
  readonly gotoAzimuth = model<number | null>(null);

  /** The viewer chose a command (the view asks for confirmation before anything is sent). */
  readonly send = output<CommandChoice>();
  /** The viewer wants to send these settings (after confirmation). */
  readonly configure = output<UnitConfig>();

  /** New settings for `configure`; empty fields are left as they are on the unit. */
  protected readonly cfgDetectorTilt = signal<number | null>(null);
  protected readonly cfgGain = signal<number | null>(null);
  protected readonly cfgDeadband = signal<number | null>(null);
  protected readonly cfgReportInterval = signal<number | null>(null);
  protected readonly settings = computed(() =>
    settingsFromForm({
      detectorTiltDeg: this.cfgDetectorTilt(),
      gain: this.cfgGain(),
      deadbandWm2: this.cfgDeadband(),
      reportIntervalS: this.cfgReportInterval(),
    }),
  );

  protected sendSettings(): void {
    const config = this.settings();
    if (config) this.configure.emit(config);
  }
}
