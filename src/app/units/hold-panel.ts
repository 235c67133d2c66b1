import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { Role } from '../../../shared/contracts/api';
import type { HoldView } from '../../../shared/contracts/holds';
import { ago, siteTime, utcTime } from '../live/unit-status';

/** One hold as the panel shows it, with what the viewer may do about it. */
interface HoldRow {
  hold: HoldView;
  mine: boolean;
  /** 'own': release my hold; 'admin': release someone else's, giving a reason; null: say who may. */
  action: 'own' | 'admin' | null;
  whoMay: string;
}

/**
 * The maintenance holds in force on a unit: who holds it, since when and why, with a release button on the viewer's own
 * hold and, for admins, on everyone else's (the dialog then asks for a reason). Motion is refused while any is listed.
 */
@Component({
  selector: 'bw-hold-panel',
  imports: [MatButtonModule, MatIconModule, MatProgressBarModule, MatTooltipModule],
  template: `
    <section class="panel" aria-labelledby="holds-title" data-testid="hold-panel">
      <h2 id="holds-title">Maintenance holds</h2>
      @if (problem(); as message) {
        <div class="notice problem" role="alert" data-testid="holds-problem">
          <mat-icon aria-hidden="true">error</mat-icon>
          <p>The holds could not be loaded. {{ message }}</p>
          <button mat-button type="button" (click)="retry.emit()"><mat-icon>refresh</mat-icon>Try again</button>
        </div>
      } @else if (holds() === null) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading holds" />
      } @else if (rows().length === 0) {
        <div class="empty-state small" data-testid="holds-empty">
          <mat-icon aria-hidden="true">lock_open</mat-icon>
          @if (reportedHeld()) {
            <p>
              No hold is in force here, but the unit reports that it is held (a hold set on the unit itself, or a release not carried out
              yet). Motion stays refused until it reports otherwise.
            </p>
          } @else {
            <p>No holds in force. Anyone who works on the unit puts their own hold on it first.</p>
          }
        </div>
      } @else {
        <p class="hint">
          Motion is refused while any hold is in force and resumes only when the last one is released. A hold is a software lock, not a
          lockout.
        </p>
        <ul class="holds" aria-label="Holds in force, oldest first">
          @for (r of rows(); track r.hold.id) {
            <li [attr.data-testid]="'hold-' + r.hold.id">
              <mat-icon aria-hidden="true">{{ r.hold.holder.kind === 'ticket' ? 'confirmation_number' : 'front_hand' }}</mat-icon>
              <div class="what">
                <p class="who">
                  <strong>{{ r.hold.holder.name }}</strong>
                  @if (r.mine) {
                    <span class="you"> (you)</span>
                  }
                </p>
                <p class="quiet since" [matTooltip]="utcTime(r.hold.placedAt)">
                  Since {{ siteTime(r.hold.placedAt, timeZone(), true) }} · {{ ago(r.hold.placedAt, now()) }}
                  @if (r.hold.placedBy.id !== r.hold.holder.id || r.hold.holder.kind !== 'person') {
                    · placed by {{ r.hold.placedBy.name }}
                  }
                </p>
                @if (r.hold.note) {
                  <p class="note" data-testid="hold-note">{{ r.hold.note }}</p>
                }
              </div>
              <div class="act">
                @if (r.action === 'own') {
                  <button mat-stroked-button type="button" [disabled]="busy()" (click)="release.emit(r.hold)" data-testid="release-own">
                    <mat-icon>play_circle</mat-icon>Release my hold
                  </button>
                } @else if (r.action === 'admin') {
                  <button
                    mat-stroked-button
                    type="button"
                    [disabled]="busy()"
                    (click)="release.emit(r.hold)"
                    [attr.data-testid]="'release-other-' + r.hold.id"
                  >
                    <mat-icon>admin_panel_settings</mat-icon>Release for {{ r.hold.holder.name }}…
                  </button>
                } @else {
                  <span class="quiet">{{ r.whoMay }}</span>
                }
              </div>
            </li>
          }
        </ul>
      }
    </section>
  `,
  styles: `
    :host {
      display: block;
      min-width: 0;
    }
    .panel {
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 12px;
      padding: 12px 16px;
      background: var(--mat-sys-surface-container-lowest);
      h2 {
        font: var(--mat-sys-title-medium);
        margin: 0 0 8px;
      }
    }
    .holds {
      list-style: none;
      padding: 0;
      margin: 8px 0 0;
      display: grid;
      gap: 8px;
    }
    .holds li {
      display: flex;
      flex-wrap: wrap;
      align-items: flex-start;
      gap: 8px 12px;
      padding: 8px 12px;
      border-radius: 12px;
      background: var(--bw-caution-container);
      color: var(--mat-sys-on-surface);
      border-left: 4px solid var(--bw-caution);
    }
    .holds li > mat-icon {
      color: var(--bw-caution);
      flex: none;
    }
    .what {
      flex: 1 1 200px;
      min-width: 0;
      p {
        margin: 0 0 2px;
        overflow-wrap: anywhere;
      }
    }
    .you {
      font: var(--mat-sys-body-small);
    }
    .note {
      font: var(--mat-sys-body-medium);
    }
    .act {
      flex: 0 1 auto;
      display: flex;
      align-items: center;
    }
    .quiet {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-small);
    }
    .hint {
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
      margin: 4px 0;
    }
    .empty-state.small {
      padding: 16px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HoldPanel {
  /** The holds in force, oldest first; null while loading. */
  readonly holds = input.required<HoldView[] | null>();
  readonly problem = input<string | null>(null);
  /** The unit reports mode 'held' although no hold is in force here. */
  readonly reportedHeld = input(false);
  readonly meId = input<number | null>(null);
  readonly role = input<Role | null>(null);
  readonly timeZone = input('UTC');
  readonly now = input(Date.now());
  /** A release is on its way: buttons wait. */
  readonly busy = input(false);

  /** The viewer wants to release this hold (their own, or as an admin someone else's). */
  readonly release = output<HoldView>();
  readonly retry = output<void>();

  protected readonly rows = computed<HoldRow[]>(() =>
    (this.holds() ?? []).map((hold) => {
      const mine = hold.holder.kind === 'person' && hold.holder.id === this.meId();
      const action = mine ? 'own' : this.role() === 'admin' ? 'admin' : null;
      const whoMay =
        hold.holder.kind === 'ticket'
          ? "Released by the ticket's check-out, cancel or close, or by an admin giving a reason."
          : `Only ${hold.holder.name} or an admin giving a reason can release this hold.`;
      return { hold, mine, action, whoMay };
    }),
  );

  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly ago = ago;
}
