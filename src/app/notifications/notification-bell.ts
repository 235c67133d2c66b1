import { ChangeDetectionStrategy, Component, computed, DestroyRef, effect, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatBadgeModule } from '@angular/material/badge';
import { MatButtonModule } from '@angular/material/button';
import { MatDividerModule } from '@angular/material/divider';
import { MatIconModule } from '@angular/material/icon';
import { MatMenuModule } from '@angular/material/menu';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import type { NotificationView } from '../../../shared/contracts/notifications';
import { NotificationApi } from '../core/notification-api';
import { LiveConnection } from '../live/live-connection';
import { toApiProblem } from '../ui/api-error';

const KIND_ICONS: Record<string, string> = {
  assigned: 'assignment_ind',
  'p1-page': 'campaign',
  escalation: 'priority_high',
  'sla-breach': 'timer_off',
  resolved: 'task_alt',
  digest: 'summarize',
};

/**
 * The toolbar's bell: how many of my notifications are unread, kept live over the socket (the server pushes each new
 * one and the count after a read), and the latest in a menu. Opening one marks it read and goes to its ticket.
 */
@Component({
  selector: 'bw-notification-bell',
  imports: [MatBadgeModule, MatButtonModule, MatDividerModule, MatIconModule, MatMenuModule, MatTooltipModule, RouterLink],
  template: `
    <button
      mat-icon-button
      type="button"
      [matMenuTriggerFor]="menu"
      [attr.aria-label]="label()"
      [matTooltip]="label()"
      [matBadge]="badge()"
      [matBadgeHidden]="!unread()"
      matBadgeColor="warn"
      matBadgeOverlap
      data-testid="notification-bell"
    >
      <mat-icon aria-hidden="true">{{ unread() ? 'notifications_unread' : 'notifications' }}</mat-icon>
    </button>
    <mat-menu #menu="matMenu" xPosition="before" class="bell-menu">
      <div class="bell-heading" role="presentation">
        <strong>Notifications</strong>
        <a routerLink="/notifications" data-testid="notification-settings-link">Settings</a>
      </div>
      <mat-divider />
      @if (problem(); as p) {
        <p class="bell-note" role="alert" data-testid="bell-problem">Notifications could not be loaded: {{ p }}</p>
      } @else if (loading() && !items().length) {
        <p class="bell-note" data-testid="bell-loading">Loading…</p>
      } @else if (!items().length) {
        <p class="bell-note" data-testid="bell-empty">Nothing yet. Assignments, P1 pages and overdue targets show up here.</p>
      }
      @for (n of items(); track n.id) {
        <button mat-menu-item type="button" (click)="open(n)" [class.unread]="!n.readAt" [attr.data-testid]="'notification-' + n.id">
          <mat-icon aria-hidden="true">{{ icon(n.kind) }}</mat-icon>
          <span class="bell-item">
            <span class="bell-title">{{ n.title }}</span>
            <span class="bell-time">{{ when(n.createdAt) }}{{ n.readAt ? '' : ' · unread' }}</span>
          </span>
        </button>
      }
    </mat-menu>
  `,
  styles: `
    .bell-heading {
      display: flex;
      justify-content: space-between;
      gap: 16px;
      padding: 8px 16px;
    }
    .bell-note {
      padding: 8px 16px;
      margin: 0;
      max-width: 320px;
    }
    .bell-item {
      display: flex;
      flex-direction: column;
      line-height: 1.3;
      white-space: normal;
    }
    .bell-time {
      font-size: 0.8em;
      opacity: 0.75;
    }
    .unread .bell-title {
      font-weight: 600;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationBell {
  private readonly api = inject(NotificationApi);
  private readonly live = inject(LiveConnection);
  private readonly router = inject(Router);

  protected readonly unread = signal(0);
  protected readonly items = signal<NotificationView[]>([]);
  protected readonly loading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly badge = computed(() => (this.unread() > 99 ? '99+' : String(this.unread())));
  protected readonly label = computed(() => (this.unread() ? `Notifications: ${this.unread()} unread` : 'Notifications: none unread'));

  constructor() {
    const destroyRef = inject(DestroyRef);
    this.live.hold(destroyRef);
    this.live.messages.pipe(takeUntilDestroyed(destroyRef)).subscribe((msg) => {
      if (msg.type !== 'notification') return;
      this.unread.set(msg.unread);
      const n = msg.notification;
      if (n) this.items.update((list) => [n, ...list.filter((x) => x.id !== n.id)].slice(0, 20));
    });
    // Whatever came while the link was down: load again on every (re)connect.
    effect(() => {
      if (this.live.state() === 'live') this.reload();
    });
    this.reload();
  }

  protected icon(kind: string): string {
    return KIND_ICONS[kind] ?? 'notifications';
  }

  protected when(iso: string): string {
    return new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
  }

  protected open(n: NotificationView): void {
    if (!n.readAt) {
      this.api.read(n.id).subscribe({
        next: (read) => this.items.update((list) => list.map((x) => (x.id === read.id ? read : x))),
        error: () => undefined, // the bell stays as it was; the next load repairs it
      });
    }
    if (n.ticketId !== null) void this.router.navigate(['/tickets', n.ticketId]);
  }

  private reload(): void {
    this.loading.set(true);
    this.api.list().subscribe({
      next: (list) => {
        this.unread.set(list.unread);
        this.items.set(list.items);
        this.loading.set(false);
        this.problem.set(null);
      },
      error: (error: unknown) => {
        this.loading.set(false);
        this.problem.set(toApiProblem(error).message);
      },
    });
  }
}
