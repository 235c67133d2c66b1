import { ChangeDetectionStrategy, Component, computed, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type { Site } from '../../../shared/contracts/api';
import { ALARM_KINDS, ALARM_SEVERITIES, type AlarmView } from '../../../shared/contracts/alarms';
import { may } from '../../../shared/contracts/permissions';
import { Session } from '../auth/session';
import { AlarmApi, toAlarmView } from '../core/alarm-api';
import { alarmKindLabel, filterAlarms, severityLook, sortAlarms, upsertAlarm, type AlarmListFilter } from '../live/alarm-look';
import { LinkBadge } from '../live/link-badge';
import { LiveConnection } from '../live/live-connection';
import { SiteApi } from '../core/site-api';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import { AlarmCard } from './alarm-card';
import { TicketApi } from '../core/ticket-api';
import { Router } from '@angular/router';

/** Alarms of every site the user may see, most urgent first, live; technicians acknowledge here. */
@Component({
  selector: 'bw-alarm-board',
  imports: [FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule, LinkBadge, AlarmCard],
  templateUrl: './alarm-board.html',
  styleUrl: './alarm-board.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AlarmBoard {
  private readonly api = inject(AlarmApi);
  private readonly siteApi = inject(SiteApi);
  private readonly session = inject(Session);
  private readonly notify = inject(Notify);
  private readonly live = inject(LiveConnection);
  private readonly tickets = inject(TicketApi);
  private readonly router = inject(Router);

  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly alarms = signal<AlarmView[]>([]);
  protected readonly sites = signal<Site[]>([]);
  protected readonly acking = signal<ReadonlySet<number>>(new Set());

  protected readonly siteFilter = signal<number | null>(null);
  protected readonly kindFilter = signal<string | null>(null);
  protected readonly stateFilter = signal<AlarmListFilter['state']>('open');

  protected readonly canAcknowledge = computed(() => may(this.session.role(), 'acknowledgeAlarms'));
  protected readonly canOpenTicket = computed(() => may(this.session.role(), 'openTickets'));
  protected readonly traceLinks = computed(() => may(this.session.role(), 'readTraces'));
  protected readonly siteMap = computed(() => new Map(this.sites().map((s) => [s.id, s])));
  protected readonly shown = computed(() =>
    sortAlarms(filterAlarms(this.alarms(), { siteId: this.siteFilter(), kind: this.kindFilter(), state: this.stateFilter() })),
  );
  protected readonly counts = computed(() => {
    const c: Record<string, number> = {};
    for (const a of filterAlarms(this.alarms(), { siteId: this.siteFilter(), kind: null, state: 'open' }))
      c[a.severity] = (c[a.severity] ?? 0) + 1;
    return ALARM_SEVERITIES.map((code) => ({ look: severityLook(code), count: c[code] ?? 0 }));
  });
  protected readonly kinds = computed(() => [...new Set<string>([...ALARM_KINDS, ...this.alarms().map((a) => a.kind)])]);
  protected readonly stateOptions: { value: AlarmListFilter['state']; label: string }[] = [
    { value: 'open', label: 'Open' },
    { value: 'unacknowledged', label: 'Open, not acknowledged' },
    { value: 'cleared', label: 'Cleared' },
    { value: 'all', label: 'All' },
  ];
  protected readonly alarmKindLabel = alarmKindLabel;

  constructor() {
    this.live.watch({ fleet: true }, inject(DestroyRef));
    this.live.messages.pipe(takeUntilDestroyed()).subscribe((msg) => {
      if (msg.type !== 'alarm') return;
      const a = toAlarmView(msg.alarm);
      if (a) this.alarms.set(upsertAlarm(this.alarms(), a));
    });
    this.siteApi.list().subscribe({ next: (s) => this.sites.set(s), error: () => undefined });
    this.load();
  }

  protected setState(state: AlarmListFilter['state']): void {
    const needsCleared = state === 'cleared' || state === 'all';
    const hadCleared = this.stateFilter() === 'cleared' || this.stateFilter() === 'all';
    this.stateFilter.set(state);
    if (needsCleared !== hadCleared) this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.problem.set(null);
    const s = this.stateFilter();
    const filter =
      s === 'open' || s === 'unacknowledged'
        ? { state: 'active' as const, limit: 1000 }
        : s === 'cleared'
          ? { state: 'cleared' as const, limit: 500 }
          : { limit: 1000 };
    this.api.list(filter).subscribe((r) => {
      this.loading.set(false);
      if (r.available) this.alarms.set(r.alarms);
      else this.problem.set(r.reason);
    });
  }

  protected clearFilters(): void {
    this.siteFilter.set(null);
    this.kindFilter.set(null);
    this.setState('open');
  }

  protected acknowledge(a: AlarmView): void {
    this.acking.set(new Set(this.acking()).add(a.id));
    const done = () => {
      const next = new Set(this.acking());
      next.delete(a.id);
      this.acking.set(next);
    };
    this.api.acknowledge(a.id).subscribe({
      next: (v) => {
        done();
        this.alarms.set(upsertAlarm(this.alarms(), v));
        this.notify.done(`Acknowledged: ${alarmKindLabel(v.kind)}${v.serial ? ` on ${v.serial}` : ''}.`);
      },
      error: (e: unknown) => {
        done();
        this.notify.problem(`The alarm was not acknowledged. ${toApiProblem(e).message}`);
      },
    });
  }

  protected openTicket(a: AlarmView): void {
    this.tickets.forAlarm(a.id).subscribe({
      next: (t) => void this.router.navigate(['/tickets', t.id]),
      error: (e: unknown) => this.notify.problem(`No ticket was opened. ${toApiProblem(e).message}`),
    });
  }
}
