import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { Site, Unit } from '../../../shared/contracts/api';
import { ALARM_SEVERITIES, type AlarmSeverity } from '../../../shared/contracts/alarms';
import { may } from '../../../shared/contracts/permissions';
import { OPEN_TICKET_STATES, TICKET_STATES, type TicketState } from '../../../shared/contracts/tickets';
import { Session } from '../auth/session';
import { SiteApi } from '../core/site-api';
import { TicketApi, type TicketView } from '../core/ticket-api';
import { UnitApi } from '../core/unit-api';
import { severityLook } from '../live/alarm-look';
import { siteTime, utcTime } from '../live/unit-status';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import { CLOCK_LABEL, CLOCK_STATUS_LOOK, currentClock, sortTickets, stateLook } from './ticket-look';

type StateFilter = 'open' | 'all' | TicketState;

/**
 * Tickets: the control room's board (every site in scope, by state, overdue first) and, with `mine`, a crew member's
 * "My work" — the tickets assigned to them, ordered by due time. Owners read their own sites' tickets.
 */
@Component({
  selector: 'bw-ticket-board',
  imports: [
    FormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    RouterLink,
  ],
  templateUrl: './ticket-board.html',
  styleUrl: './ticket-board.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TicketBoard {
  private readonly api = inject(TicketApi);
  private readonly siteApi = inject(SiteApi);
  private readonly unitApi = inject(UnitApi);
  private readonly session = inject(Session);
  private readonly notify = inject(Notify);
  private readonly router = inject(Router);

  /** From the route: the crew's own list. */
  readonly mine = input(false);

  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly tickets = signal<TicketView[]>([]);
  protected readonly sites = signal<Site[]>([]);
  protected readonly stateFilter = signal<StateFilter>('open');
  protected readonly siteFilter = signal<number | null>(null);

  protected readonly canOpen = computed(() => may(this.session.role(), 'openTickets'));
  protected readonly siteMap = computed(() => new Map(this.sites().map((s) => [s.id, s])));
  protected readonly shown = computed(() => {
    const f = this.stateFilter();
    const site = this.siteFilter();
    return sortTickets(
      this.tickets().filter(
        (t) =>
          (f === 'all' || (f === 'open' ? OPEN_TICKET_STATES.includes(t.state) : t.state === f)) && (site === null || t.siteId === site),
      ),
    );
  });
  protected readonly stateOptions: { value: StateFilter; label: string }[] = [
    { value: 'open', label: 'Needing work' },
    ...TICKET_STATES.map((s) => ({ value: s as StateFilter, label: stateLook(s).label })),
    { value: 'all', label: 'All' },
  ];

  // ---- the new-ticket form (control room)
  protected readonly creating = signal(false);
  protected readonly saving = signal(false);
  protected readonly newSite = signal<number | null>(null);
  protected readonly newUnits = signal<Unit[]>([]);
  protected readonly newUnit = signal<number | null>(null);
  protected readonly newTitle = signal('');
  protected readonly newSeverity = signal<AlarmSeverity>('P3');
  protected readonly newDescription = signal('');
  protected readonly severities = ALARM_SEVERITIES;

  protected readonly stateLook = stateLook;
  protected readonly severityLook = severityLook;
  protected readonly clockLabel = CLOCK_LABEL;
  protected readonly clockLook = CLOCK_STATUS_LOOK;
  protected readonly currentClock = currentClock;
  protected readonly utc = utcTime;

  constructor() {
    this.siteApi.list().subscribe({ next: (s) => this.sites.set(s), error: () => undefined });
    queueMicrotask(() => this.load());
  }

  protected load(): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.list(this.mine() ? { assignee: 'me' } : {}).subscribe({
      next: (list) => {
        this.loading.set(false);
        this.tickets.set(list);
      },
      error: (e: unknown) => {
        this.loading.set(false);
        this.problem.set(`Tickets could not be loaded. ${toApiProblem(e).message}`);
      },
    });
  }

  protected time(t: TicketView, iso: string | null): string {
    return siteTime(iso, this.siteMap().get(t.siteId)?.timeZone ?? 'UTC', true);
  }

  protected pickSite(id: number | null): void {
    this.newSite.set(id);
    this.newUnit.set(null);
    this.newUnits.set([]);
    if (id !== null) this.unitApi.list(id).subscribe({ next: (u) => this.newUnits.set(u), error: () => undefined });
  }

  protected create(): void {
    const site = this.newSite();
    if (site === null || !this.newTitle().trim()) return;
    this.saving.set(true);
    const unit = this.newUnit();
    this.api
      .create({
        ...(unit !== null ? { unitId: unit } : { siteId: site }),
        title: this.newTitle().trim(),
        severity: this.newSeverity(),
        ...(this.newDescription().trim() ? { description: this.newDescription().trim() } : {}),
      })
      .subscribe({
        next: (t) => {
          this.saving.set(false);
          this.creating.set(false);
          this.newTitle.set('');
          this.newDescription.set('');
          this.notify.done(`Ticket ${t.id} opened.`);
          void this.router.navigate(['/tickets', t.id]);
        },
        error: (e: unknown) => {
          this.saving.set(false);
          this.notify.problem(`The ticket was not opened. ${toApiProblem(e).message}`);
        },
      });
  }
}
