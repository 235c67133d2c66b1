import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { AlarmView } from '../../../shared/contracts/alarms';
import { alarmKindLabel, evidenceSummary, severityLook, traceQuery } from '../live/alarm-look';
import { siteTime, utcTime } from '../live/unit-status';

/** One alarm: severity, kind, subject, times (site-local, UTC on hover), message, advice, evidence, acknowledge and links. */
@Component({
  selector: 'bw-alarm-card',
  imports: [MatButtonModule, MatIconModule, MatTooltipModule, RouterLink],
  template: `
    @let a = alarm();
    @let sev = look();
    <article
      class="card"
      [class.cleared]="a.state === 'cleared'"
      [attr.aria-labelledby]="'alarm-' + a.id + '-title'"
      [attr.data-testid]="'alarm-' + a.id"
    >
      <header>
        <span [class]="'sev ' + sev.cssClass" [attr.data-testid]="'alarm-sev-' + a.id"
          ><mat-icon aria-hidden="true">{{ sev.icon }}</mat-icon
          >{{ sev.code }} {{ sev.label }}</span
        >
        <h3 [id]="'alarm-' + a.id + '-title'">{{ kindLabel() }}</h3>
        @if (showSubject()) {
          <span class="subject">
            @if (a.unitId !== null) {
              <a [routerLink]="['/units', a.unitId]">{{ a.serial ?? 'Unit ' + a.unitId }}</a>
            } @else {
              <span>whole site</span>
            }
            · {{ siteName() ?? a.siteName ?? 'Site ' + a.siteId }}
          </span>
        }
        <span class="status" [attr.data-testid]="'alarm-status-' + a.id">
          @if (a.state === 'cleared') {
            <mat-icon aria-hidden="true">check_circle</mat-icon>Cleared
          } @else {
            <mat-icon aria-hidden="true">notifications_active</mat-icon>Open
          }
          @if (a.acknowledgedAt) {
            · <mat-icon aria-hidden="true">done_all</mat-icon
            ><span [matTooltip]="utc(a.acknowledgedAt)">Acknowledged{{ a.acknowledgedBy ? ' by ' + a.acknowledgedBy : '' }}</span>
          } @else {
            · <mat-icon aria-hidden="true">mark_email_unread</mat-icon>Not acknowledged
          }
        </span>
      </header>
      <p class="message">{{ a.message }}</p>
      @if (a.advice) {
        <p class="advice">
          <mat-icon aria-hidden="true">lightbulb</mat-icon><span><strong>What to do:</strong> {{ a.advice }}</span>
        </p>
      }
      <dl class="facts">
        <div>
          <dt>First seen</dt>
          <dd [matTooltip]="utc(a.firstSeenAt)">{{ local(a.firstSeenAt) }}</dd>
        </div>
        <div>
          <dt>Last seen</dt>
          <dd [matTooltip]="utc(a.lastSeenAt)">{{ local(a.lastSeenAt) }}</dd>
        </div>
        @if (a.clearedAt) {
          <div>
            <dt>Cleared</dt>
            <dd [matTooltip]="utc(a.clearedAt)">{{ local(a.clearedAt) }}{{ a.clearReason ? ' — ' + a.clearReason : '' }}</dd>
          </div>
        }
        @for (f of evidence(); track f.label) {
          <div>
            <dt>{{ f.label }}</dt>
            <dd>{{ f.value }}</dd>
          </div>
        }
      </dl>
      <div class="actions">
        @if (canAcknowledge() && !a.acknowledgedAt) {
          <button mat-flat-button type="button" (click)="acknowledge.emit(a)" [disabled]="busy()" [attr.data-testid]="'ack-' + a.id">
            <mat-icon>done_all</mat-icon>Acknowledge
          </button>
        }
        @if (canOpenTicket() && a.state === 'active') {
          <button
            mat-stroked-button
            type="button"
            (click)="openTicket.emit(a)"
            [disabled]="busy()"
            [attr.data-testid]="'ticket-for-' + a.id"
          >
            <mat-icon>assignment_add</mat-icon>Ticket
          </button>
        }
        @if (showSubject() && a.unitId !== null) {
          <a mat-button [routerLink]="['/units', a.unitId]"><mat-icon>solar_power</mat-icon>Open unit</a>
        }
        @if (traceLinks() && trace(); as q) {
          <a mat-button routerLink="/traces" [queryParams]="q" [attr.data-testid]="'alarm-traces-' + a.id"
            ><mat-icon>query_stats</mat-icon>Traces at this time</a
          >
        }
      </div>
    </article>
  `,
  styles: `
    .card {
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 12px;
      padding: 12px 16px;
      background: var(--mat-sys-surface-container-lowest);
    }
    .card.cleared {
      opacity: 0.85;
      border-style: dashed;
    }
    header {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 6px 12px;
    }
    h3 {
      margin: 0;
      font: var(--mat-sys-title-medium);
    }
    .subject a {
      font-weight: 600;
    }
    .status {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-small);
      mat-icon {
        font-size: 16px;
        width: 16px;
        height: 16px;
      }
    }
    .message {
      margin: 8px 0 4px;
    }
    .advice {
      display: flex;
      gap: 6px;
      margin: 4px 0;
      color: var(--mat-sys-on-surface-variant);
      mat-icon {
        flex: none;
        font-size: 18px;
        width: 18px;
        height: 18px;
      }
    }
    .facts {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(180px, 1fr));
      gap: 4px 16px;
      margin: 8px 0;
      dt {
        font: var(--mat-sys-label-small);
        color: var(--mat-sys-on-surface-variant);
      }
      dd {
        margin: 0;
      }
    }
    .actions {
      display: flex;
      flex-wrap: wrap;
      gap: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AlarmCard {
  readonly alarm = input.required<AlarmView>();
  /** IANA zone of the alarm's site (times are shown in it). */
  readonly timeZone = input('UTC');
  readonly siteName = input<string | null>(null);
  readonly canAcknowledge = input(false);
  readonly busy = input(false);
  /** Whether to name the unit and site (off inside the unit view). */
  readonly showSubject = input(true);
  /** Whether to link to the trace explorer (roles that may open it). */
  readonly traceLinks = input(false);
  readonly acknowledge = output<AlarmView>();
  /** Whether to offer the fault's ticket (the control room): found, reopened or opened in one step. */
  readonly canOpenTicket = input(false);
  readonly openTicket = output<AlarmView>();

  protected readonly look = computed(() => severityLook(this.alarm().severity));
  protected readonly kindLabel = computed(() => alarmKindLabel(this.alarm().kind));
  protected readonly evidence = computed(() => evidenceSummary(this.alarm()));
  protected readonly trace = computed(() => traceQuery(this.alarm(), Date.now()));

  protected local(iso: string): string {
    return siteTime(iso, this.timeZone(), true);
  }

  protected utc(iso: string): string {
    return utcTime(iso);
  }
}
