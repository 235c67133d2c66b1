import { ChangeDetectionStrategy, Component, computed, ElementRef, inject, signal, viewChild } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTooltipModule } from '@angular/material/tooltip';
import { ActivatedRoute, Router } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import { forkJoin, Subscription } from 'rxjs';
import type { Site, Unit } from '../../../shared/contracts/api';
import { MAX_CSV_DAYS, type UnitTraces } from '../../../shared/contracts/traces';
import { TelemetryApi } from '../core/telemetry-api';
import { readPalette } from '../live/tone-palette';
import { siteTime, utcTime } from '../live/unit-status';
import { ColourScheme } from '../shell/colour-scheme';
import { SiteApi } from '../core/site-api';
import { UnitApi } from '../core/unit-api';
import { toApiProblem } from '../ui/api-error';
import { localDateOf, traceChartOptions, zonedMidnightUtc, type TraceWindow } from './trace-charts';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

export type RangePreset = 'hour' | 'day24' | 'day' | 'week' | 'month' | 'custom';

/** The window a preset stands for, ending now (or the chosen local day for 'day'). */
export function presetWindow(preset: Exclude<RangePreset, 'custom'>, nowMs: number, day: string, timeZone: string): TraceWindow {
  switch (preset) {
    case 'hour':
      return { fromMs: nowMs - HOUR, toMs: nowMs };
    case 'day24':
      return { fromMs: nowMs - DAY, toMs: nowMs };
    case 'day': {
      const from = zonedMidnightUtc(day, timeZone);
      const next = new Date(Date.parse(`${day}T00:00:00Z`) + DAY).toISOString().slice(0, 10);
      return { fromMs: from, toMs: zonedMidnightUtc(next, timeZone) };
    }
    case 'week':
      return { fromMs: nowMs - 7 * DAY, toMs: nowMs };
    case 'month':
      return { fromMs: nowMs - 30 * DAY, toMs: nowMs };
  }
}

/** Whether a zoomed window deserves a finer fetch: the loaded buckets it shows are fewer than half the chart's points. */
export function needsDetail(loaded: { bucketMs: number }, window: TraceWindow, points: number): boolean {
  const visibleBuckets = (window.toMs - window.fromMs) / loaded.bucketMs;
  return loaded.bucketMs > 1000 && visibleBuckets < points / 2;
}

/** Engineers' traces: units and a time range, five synchronised zoomable panels, events and alarms overlaid, CSV export. */
@Component({
  selector: 'bw-trace-explorer',
  imports: [
    FormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatTooltipModule,
    NgxEchartsDirective,
  ],
  templateUrl: './trace-explorer.html',
  styleUrl: './trace-explorer.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TraceExplorer {
  private readonly api = inject(TelemetryApi);
  private readonly siteApi = inject(SiteApi);
  private readonly unitApi = inject(UnitApi);
  private readonly route = inject(ActivatedRoute);
  private readonly router = inject(Router);
  private readonly scheme = inject(ColourScheme);
  private readonly chartBox = viewChild<ElementRef<HTMLElement>>('chartBox');

  protected readonly sites = signal<Site[]>([]);
  protected readonly units = signal<Unit[]>([]);
  protected readonly selected = signal<number[]>([]);
  protected readonly preset = signal<RangePreset>('day24');
  protected readonly day = signal(localDateOf(Date.now() - DAY, 'UTC'));
  protected readonly window = signal<TraceWindow | null>(null);
  /** The range last loaded (zooming inside it does not change it). */
  protected readonly loadedWindow = signal<TraceWindow | null>(null);
  protected readonly traces = signal<UnitTraces[]>([]);
  protected readonly loading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly listProblem = signal<string | null>(null);

  protected readonly zone = computed(() => {
    const u = this.units().find((x) => x.id === this.selected()[0]);
    return this.sites().find((s) => s.id === u?.siteId)?.timeZone ?? 'UTC';
  });
  protected readonly groups = computed(() =>
    this.sites()
      .map((s) => ({ site: s, units: this.units().filter((u) => u.siteId === s.id) }))
      .filter((g) => g.units.length),
  );
  protected readonly options = computed(() => {
    void this.scheme.current();
    const w = this.loadedWindow();
    if (!w || !this.traces().length) return null;
    return traceChartOptions(this.traces(), readPalette(), this.zone(), w);
  });
  protected readonly hasData = computed(() => this.traces().some((t) => t.t.length > 0));
  protected readonly totalRows = computed(() => this.traces().reduce((s, t) => s + t.rows, 0));
  protected readonly csvReason = computed(() => {
    const w = this.window();
    if (!w) return 'Load a range first.';
    if (w.toMs - w.fromMs > MAX_CSV_DAYS * DAY) return `Zoom in to ${MAX_CSV_DAYS} days or less to export the raw reports.`;
    return null;
  });
  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;

  private request: Subscription | null = null;
  private zoomTimer: ReturnType<typeof setTimeout> | null = null;

  constructor() {
    forkJoin({ sites: this.siteApi.list(), units: this.unitApi.list() }).subscribe({
      next: ({ sites, units }) => {
        this.sites.set(sites);
        this.units.set(units);
        const q = this.route.snapshot.queryParamMap;
        const ids = (q.get('units') ?? '')
          .split(',')
          .map(Number)
          .filter((id) => units.some((u) => u.id === id));
        const from = Date.parse(q.get('from') ?? '');
        const to = Date.parse(q.get('to') ?? '');
        if (ids.length) this.selected.set(ids.slice(0, 4));
        this.day.set(localDateOf(Date.now() - DAY, this.zone()));
        if (ids.length && from < to) {
          this.preset.set('custom');
          this.load({ fromMs: from, toMs: to });
        } else if (ids.length) this.apply();
      },
      error: (e: unknown) => this.listProblem.set(toApiProblem(e).message),
    });
  }

  /** Loads the chosen preset. */
  protected apply(): void {
    const preset = this.preset();
    if (preset === 'custom') {
      const w = this.window();
      if (w) this.load(w);
      return;
    }
    this.load(presetWindow(preset, Date.now(), this.day(), this.zone()), true);
  }

  protected load(w: TraceWindow, first = false): void {
    const ids = this.selected();
    if (!ids.length) return;
    if (first || !this.firstWindow) this.firstWindow = w;
    this.request?.unsubscribe();
    this.loading.set(true);
    this.problem.set(null);
    const points = this.chartPoints();
    this.request = forkJoin(ids.map((id) => this.api.traces(id, new Date(w.fromMs), new Date(w.toMs), points))).subscribe({
      next: (all) => {
        this.traces.set(all);
        this.window.set(w);
        this.loadedWindow.set(w);
        this.loading.set(false);
        void this.router.navigate([], {
          queryParams: { units: ids.join(','), from: new Date(w.fromMs).toISOString(), to: new Date(w.toMs).toISOString() },
          replaceUrl: true,
        });
      },
      error: (e: unknown) => {
        this.problem.set(toApiProblem(e).message);
        this.loading.set(false);
      },
    });
  }

  /** After a zoom: remember the visible window, and fetch finer data when the zoom outgrew the loaded resolution. */
  protected onZoom(chart: { getOption(): { dataZoom?: { startValue?: number; endValue?: number }[] } } | null): void {
    const dz = chart?.getOption().dataZoom?.[0];
    if (!dz || dz.startValue === undefined || dz.endValue === undefined) return;
    const w = { fromMs: Math.round(dz.startValue), toMs: Math.round(dz.endValue) };
    this.window.set(w);
    if (this.zoomTimer) clearTimeout(this.zoomTimer);
    const loaded = this.traces()[0];
    if (!loaded || !needsDetail(loaded, w, this.chartPoints())) return;
    this.zoomTimer = setTimeout(() => {
      this.preset.set('custom');
      this.load(w);
    }, 500);
  }

  private chartInstance: { getOption(): { dataZoom?: { startValue?: number; endValue?: number }[] } } | null = null;
  protected onChartInit(chart: unknown): void {
    this.chartInstance = chart as typeof this.chartInstance;
  }
  protected zoomed(): void {
    this.onZoom(this.chartInstance);
  }

  /** Back to the range first chosen (or linked). */
  protected resetZoom(): void {
    const first = this.firstWindow;
    if (first) this.load(first);
  }
  private firstWindow: TraceWindow | null = null;

  protected csvLinks(): { serial: string; href: string }[] {
    const w = this.window();
    if (!w) return [];
    return this.traces().map((t) => ({ serial: t.serial, href: this.api.tracesCsvUrl(t.unitId, new Date(w.fromMs), new Date(w.toMs)) }));
  }

  /** One point per pixel of chart width, 200…2000. */
  private chartPoints(): number {
    const width = this.chartBox()?.nativeElement.clientWidth || 1200;
    return Math.max(200, Math.min(2000, Math.round(width)));
  }
}
