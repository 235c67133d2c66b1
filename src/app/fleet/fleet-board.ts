import { ChangeDetectionStrategy, Component, computed, DestroyRef, effect, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import { forkJoin, interval, startWith } from 'rxjs';
import type { Site, Unit } from '../../../shared/contracts/api';
import type { UnitLiveState } from '../../../shared/contracts/live';
import { SiteApi } from '../core/site-api';
import { UnitApi } from '../core/unit-api';
import { toApiProblem } from '../ui/api-error';
import { AlarmApi, toAlarmView, type AlarmView } from '../core/alarm-api';
import { alarmKindLabel, severityLook, upsertAlarm } from '../live/alarm-look';
import { LandscapeApi } from '../core/landscape-api';
import { LinkBadge } from '../live/link-badge';
import { LiveConnection } from '../live/live-connection';
import { readPalette } from '../live/tone-palette';
import { ago, siteTime, TONE_WORDS, utcTime, withUnit, type Tone } from '../live/unit-status';
import { ColourScheme } from '../shell/colour-scheme';
import { filterRows, fleetRows, mergeStates, sortRows, toneCounts, type FleetRow, type FleetSortKey } from './fleet-rows';
import { sitePlanOptions } from './site-plan';

/** Every site and unit with its live state: the technician's home. */
@Component({
  selector: 'bw-fleet-board',
  imports: [
    FormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    MatTooltipModule,
    RouterLink,
    NgxEchartsDirective,
    LinkBadge,
  ],
  templateUrl: './fleet-board.html',
  styleUrl: './fleet-board.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FleetBoard {
  private readonly siteApi = inject(SiteApi);
  private readonly unitApi = inject(UnitApi);
  private readonly landscapeApi = inject(LandscapeApi);
  private readonly alarmApi = inject(AlarmApi);
  private readonly router = inject(Router);
  private readonly scheme = inject(ColourScheme);
  protected readonly live = inject(LiveConnection);

  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly sites = signal<Site[]>([]);
  protected readonly units = signal<Unit[]>([]);
  protected readonly states = signal<ReadonlyMap<number, UnitLiveState>>(new Map());
  protected readonly bests = signal<ReadonlyMap<number, number>>(new Map());
  protected readonly alarms = signal<AlarmView[]>([]);
  protected readonly alarmsUnavailable = signal<string | null>(null);
  protected readonly now = signal(Date.now());

  protected readonly text = signal('');
  protected readonly siteFilter = signal<number | null>(null);
  protected readonly toneFilter = signal<Tone | 'alarm' | null>(null);
  protected readonly sort = signal<{ key: FleetSortKey; direction: 'asc' | 'desc' }>({ key: 'state', direction: 'asc' });
  protected readonly planSiteId = signal<number | null>(null);

  protected readonly columns = ['serial', 'site', 'state', 'power', 'poa', 'shortfall', 'alarms', 'lastReport'];
  private readonly siteMap = computed(() => new Map(this.sites().map((s) => [s.id, s])));
  protected readonly allRows = computed(() => fleetRows(this.units(), this.siteMap(), this.states(), this.bests(), this.alarms()));
  protected readonly rows = computed(() => {
    const s = this.sort();
    return sortRows(
      filterRows(this.allRows(), { text: this.text(), siteId: this.siteFilter(), tone: this.toneFilter() }),
      s.key,
      s.direction,
    );
  });
  protected readonly counts = computed(() => toneCounts(this.allRows()));
  protected readonly planSite = computed(
    () => this.siteMap().get(this.planSiteId() ?? this.siteFilter() ?? this.sites()[0]?.id ?? -1) ?? null,
  );
  protected readonly planOptions = computed(() => {
    void this.scheme.current();
    const site = this.planSite();
    if (!site) return null;
    return sitePlanOptions(
      this.allRows().filter((r) => r.unit.siteId === site.id),
      readPalette(),
    );
  });

  protected readonly toneChips: { tone: Tone | 'alarm'; label: string; icon: string }[] = [
    { tone: 'problem', label: TONE_WORDS.problem, icon: 'error' },
    { tone: 'alarm', label: 'With open alarms', icon: 'notifications_active' },
    { tone: 'caution', label: TONE_WORDS.caution, icon: 'front_hand' },
    { tone: 'busy', label: TONE_WORDS.busy, icon: 'trending_up' },
    { tone: 'good', label: TONE_WORDS.good, icon: 'check_circle' },
    { tone: 'stopped', label: TONE_WORDS.stopped, icon: 'hourglass_empty' },
  ];

  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly ago = ago;
  protected readonly withUnit = withUnit;
  protected readonly alarmKindLabel = alarmKindLabel;
  protected readonly severityLook = severityLook;

  constructor() {
    const destroyRef = inject(DestroyRef);
    this.load();
    this.live.watch({ fleet: true }, destroyRef);
    this.live.messages.pipe(takeUntilDestroyed()).subscribe((msg) => {
      if (msg.type === 'snapshot' && msg.fleet) this.states.set(mergeStates(this.states(), msg.units, true));
      else if (msg.type === 'units') this.states.set(mergeStates(this.states(), msg.units));
      else if (msg.type === 'alarm') {
        const a = toAlarmView(msg.alarm);
        if (a) this.alarms.set(upsertAlarm(this.alarms(), a));
      }
    });
    // Ages ("12 s ago") tick; modelled bests refresh every 5 minutes.
    interval(5000)
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.now.set(Date.now()));
    interval(300_000)
      .pipe(startWith(0), takeUntilDestroyed())
      .subscribe(() => this.loadBests());
    effect(() => {
      // Follow the site filter on the plan unless a plan site was chosen.
      const f = this.siteFilter();
      if (f !== null) this.planSiteId.set(f);
    });
  }

  protected load(): void {
    this.loading.set(true);
    this.problem.set(null);
    forkJoin({ sites: this.siteApi.list(), units: this.unitApi.list() }).subscribe({
      next: ({ sites, units }) => {
        this.sites.set(sites);
        this.units.set(units.filter((u) => !u.disabled));
        this.loading.set(false);
        this.loadBests();
      },
      error: (e: unknown) => {
        this.problem.set(toApiProblem(e).message);
        this.loading.set(false);
      },
    });
    this.alarmApi.list({ state: 'active' }).subscribe((r) => {
      if (r.available) {
        this.alarms.set(r.alarms);
        this.alarmsUnavailable.set(null);
      } else this.alarmsUnavailable.set(r.reason);
    });
  }

  private loadBests(): void {
    for (const s of this.sites()) {
      this.landscapeApi.bestNow(s.id).subscribe({
        next: (b) => this.bests.set(new Map(this.bests()).set(s.id, b.wm2)),
        error: () => undefined, // the shortfall column shows a dash
      });
    }
  }

  protected onSort(e: Sort): void {
    this.sort.set({ key: (e.active || 'state') as FleetSortKey, direction: e.direction === 'desc' ? 'desc' : 'asc' });
  }

  protected toggleTone(tone: Tone | 'alarm'): void {
    this.toneFilter.set(this.toneFilter() === tone ? null : tone);
  }

  protected clearFilters(): void {
    this.text.set('');
    this.siteFilter.set(null);
    this.toneFilter.set(null);
  }

  protected openFromPlan(e: { data?: { unitId?: number } }): void {
    if (e.data?.unitId) void this.router.navigate(['/units', e.data.unitId]);
  }

  protected alarmTitle(r: FleetRow): string {
    return r.alarms
      .map(
        (a) =>
          `${a.severity} ${severityLook(a.severity).label} · ${alarmKindLabel(a.kind)}${a.acknowledgedAt ? ' (acknowledged)' : ''}: ${a.message}`,
      )
      .join('\n');
  }

  protected trackRow = (_: number, r: FleetRow) => r.unit.id;
}
