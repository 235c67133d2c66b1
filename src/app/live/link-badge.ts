import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { LiveConnection } from './live-connection';

/** The state of the live link, in words and an icon, with "Reconnect now" while it is down. */
@Component({
  selector: 'bw-link-badge',
  imports: [MatButtonModule, MatIconModule],
  template: `
    <span class="link" [class]="'link ' + look().tone" role="status" aria-live="polite" data-testid="link-state">
      <mat-icon aria-hidden="true">{{ look().icon }}</mat-icon>{{ look().label }}
    </span>
    @if (live.state() === 'reconnecting') {
      <button mat-button type="button" (click)="live.reconnectNow()"><mat-icon>refresh</mat-icon>Reconnect now</button>
    }
  `,
  styles: `
    :host {
      display: inline-flex;
      align-items: center;
      gap: 8px;
      flex-wrap: wrap;
    }
    .link {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 4px 12px;
      border-radius: 16px;
      font: var(--mat-sys-label-large);
    }
    .link mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
    .good {
      background: var(--bw-good-container);
      color: var(--bw-good);
    }
    .caution {
      background: var(--bw-caution-container);
      color: var(--bw-caution);
    }
    .stopped {
      background: var(--mat-sys-surface-container-high);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LinkBadge {
  protected readonly live = inject(LiveConnection);
  protected readonly look = computed(() => {
    switch (this.live.state()) {
      case 'live':
        return { label: 'Live', icon: 'sensors', tone: 'good' };
      case 'connecting':
        return { label: 'Connecting…', icon: 'sync', tone: 'stopped' };
      case 'reconnecting':
        return { label: 'Connection lost — reconnecting', icon: 'sync_problem', tone: 'caution' };
      default:
        return { label: 'Not connected', icon: 'sensors_off', tone: 'stopped' };
    }
  });
}
