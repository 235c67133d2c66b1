import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { HealthSettingsHistory, SiteHealthSettings } from '../../../shared/contracts/alarms';
import { HEALTH_SETTING_WORDS } from '../../../shared/contracts/health-setting-words';
import { fieldWords } from '../../../shared/contracts/plain-words';
import { siteTime, utcTime } from '../live/unit-status';
import { valueText } from './setting-rows';

/** "Stow above gust: default (18 m/s) → 16 m/s". */
export function changeText(
  change: HealthSettingsHistory['entries'][number]['changes'][number],
  settings: Pick<SiteHealthSettings, 'defaults' | 'ranges'> | null,
): string {
  const label = HEALTH_SETTING_WORDS[change.key]?.label ?? fieldWords(change.key);
  const unit = settings?.ranges[change.key]?.unit ?? '';
  const def = settings?.defaults[change.key];
  const side = (v: number | null) =>
    v === null ? (def === undefined ? 'default' : `default (${valueText(def, unit)})`) : valueText(v, unit);
  return `${label}: ${side(change.from)} → ${side(change.to)}`;
}

/** Who changed a site's health settings, when, why, and what changed (old → new), newest first. */
@Component({
  selector: 'bw-settings-history',
  imports: [MatButtonModule, MatIconModule, MatTooltipModule],
  template: `
    <section class="panel" aria-labelledby="history-title">
      <h2 id="history-title">History of changes</h2>
      @if (problem(); as p) {
        <div class="notice problem" role="alert" data-testid="history-problem">
          <mat-icon aria-hidden="true">error</mat-icon>
          <p>The history could not be loaded. {{ p }}</p>
          <button mat-button type="button" (click)="retry.emit()"><mat-icon>refresh</mat-icon>Try again</button>
        </div>
      } @else if (!history()) {
        <p class="quiet" role="status" data-testid="history-loading">Loading the history…</p>
      } @else if (!history()!.entries.length) {
        <div class="empty-state small" data-testid="history-empty">
          <mat-icon aria-hidden="true">history</mat-icon>
          <p>No change yet: every threshold of this site has its default or was set before changes were recorded.</p>
        </div>
      } @else {
        <ol class="entries">
          @for (e of history()!.entries; track $index) {
            <li data-testid="history-entry">
              <p class="head">
                <mat-icon aria-hidden="true">tune</mat-icon>
                <strong>{{ e.by?.name ?? 'A person no longer on record' }}</strong>
                <span [matTooltip]="utcTime(e.at)">{{ siteTime(e.at, timeZone(), true) }}</span>
              </p>
              <p class="reason" data-testid="history-reason">
                {{ e.reason ?? 'No reason recorded (saved before reasons were asked for).' }}
              </p>
              @if (e.changes.length) {
                <ul class="changes">
                  @for (c of e.changes; track c.key) {
                    <li>{{ changeText(c, settings()) }}</li>
                  }
                </ul>
              } @else {
                <p class="quiet">Saved without changing a value.</p>
              }
            </li>
          }
        </ol>
        @if (more() > 0) {
          <p class="quiet" data-testid="history-more">{{ more() }} older change{{ more() === 1 ? '' : 's' }} in the audit log.</p>
        }
      }
    </section>
  `,
  styleUrl: '../units/unit-panel.scss',
  styles: `
    .entries {
      list-style: none;
      padding: 0;
      margin: 0;
      > li {
        padding: 8px 0;
        border-top: 1px solid var(--mat-sys-outline-variant);
      }
    }
    .head {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
      margin: 0;
    }
    .reason {
      margin: 4px 0;
      font-style: italic;
    }
    .changes {
      margin: 0;
      padding-left: 20px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SettingsHistory {
  readonly history = input<HealthSettingsHistory | null>(null);
  /** For the defaults and units of the values named. */
  readonly settings = input<SiteHealthSettings | null>(null);
  readonly timeZone = input('UTC');
  readonly problem = input<string | null>(null);
  readonly retry = output<void>();

  protected readonly more = computed(() => {
    const h = this.history();
    return h ? h.total - h.entries.length : 0;
  });
  protected readonly changeText = changeText;
  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
}
