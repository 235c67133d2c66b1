import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSliderModule } from '@angular/material/slider';
import { MatTabsModule } from '@angular/material/tabs';
import { MatTooltipModule } from '@angular/material/tooltip';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import { Subject, Subscription, debounceTime } from 'rxjs';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { may } from '../../../shared/contracts/permissions';
import { Session } from '../auth/session';
import type { LandscapeDay, SiteLandscape } from '../../../shared/contracts/landscape';
import { LandscapeApi } from '../core/landscape-api';
import { readPalette } from '../live/tone-palette';
import { siteTime, utcTime } from '../live/unit-status';
import { ColourScheme } from '../shell/colour-scheme';
import { SiteChoice } from '../sites/site-choice';
import { toApiProblem } from '../ui/api-error';
import { localDateOf, zonedMidnightUtc } from '../traces/trace-charts';
import { dayOptions, heatmapOptions, maximaMarks } from './landscape-charts';
import { SurveyEditor } from './survey-editor';
import { SurveyRevisionsPanel } from './survey-revisions-panel';

/** Minutes after local midnight → "HH:MM". */
export function minutesLabel(m: number): string {
  return `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
}

/** The site's modelled irradiance landscape at an instant, the blurred one a detector pair climbs, its peaks, and the day. */
@Component({
  selector: 'bw-landscape-view',
  imports: [
    FormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSliderModule,
    MatTabsModule,
    MatTooltipModule,
    NgxEchartsDirective,
    RouterLink,
    SurveyEditor,
    SurveyRevisionsPanel,
  ],
  templateUrl: './landscape-view.html',
  styleUrl: './landscape-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LandscapeView {
  private readonly api = inject(LandscapeApi);
  private readonly route = inject(ActivatedRoute);
  private readonly router = inject(Router);
  private readonly scheme = inject(ColourScheme);

  private readonly session = inject(Session);
  private readonly siteChoice = new SiteChoice(
    (id) => this.chooseSite(id),
    (sites) => sites.find((s) => !s.indoor) ?? sites[0],
  );
  protected readonly sites = this.siteChoice.sites;
  protected readonly sitesLoaded = this.siteChoice.loaded;
  protected readonly sitesProblem = this.siteChoice.problem;
  protected readonly canAddSites = computed(() => may(this.session.role(), 'administer'));
  protected readonly siteId = signal<number | null>(null);
  protected readonly date = signal(localDateOf(Date.now(), 'UTC'));
  /** Minutes after local midnight, 15-minute steps. */
  protected readonly minutes = signal(12 * 60);
  protected readonly detectorTilt = signal(10);
  protected readonly landscape = signal<SiteLandscape | null>(null);
  protected readonly day = signal<LandscapeDay | null>(null);
  protected readonly loading = signal(false);
  protected readonly dayLoading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly dayProblem = signal<string | null>(null);

  protected readonly site = computed(() => this.sites().find((s) => s.id === this.siteId()) ?? null);
  protected readonly zone = computed(() => this.site()?.timeZone ?? 'UTC');
  protected readonly atMs = computed(() => zonedMidnightUtc(this.date(), this.zone()) + this.minutes() * 60_000);
  protected readonly marks = computed(() => (this.landscape() ? maximaMarks(this.landscape()!) : []));
  private readonly peak = computed(() => this.landscape()?.globalMax.wm2);
  protected readonly rawOptions = computed(() => {
    void this.scheme.current();
    const l = this.landscape();
    return l?.grid ? heatmapOptions(l, 'values', readPalette(), this.peak()) : null;
  });
  protected readonly blurredOptions = computed(() => {
    void this.scheme.current();
    const l = this.landscape();
    return l?.grid ? heatmapOptions(l, 'blurred', readPalette(), this.peak()) : null;
  });
  protected readonly dayChart = computed(() => {
    void this.scheme.current();
    const d = this.day();
    const zone = this.zone();
    return d && d.hours.length ? dayOptions(d, readPalette(), (iso) => siteTime(iso, zone).slice(0, 5)) : null;
  });
  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly minutesLabel = minutesLabel;
  protected readonly degrees = (v: number) => `${v}°`;

  private readonly changes = new Subject<void>();
  private request: Subscription | null = null;

  constructor() {
    this.changes.pipe(debounceTime(350), takeUntilDestroyed()).subscribe(() => this.loadLandscape());
    this.loadSites();
  }

  protected loadSites(): void {
    this.siteChoice.load();
  }

  protected chooseSite(id: number): void {
    this.siteId.set(id);
    // A link may name the day and the site-local time (?date=YYYY-MM-DD&time=HH:MM); otherwise today.
    const q = this.route.snapshot.queryParamMap;
    const date = q.get('date');
    const time = /^(\d{2}):(\d{2})$/.exec(q.get('time') ?? '');
    this.date.set(date && /^\d{4}-\d{2}-\d{2}$/.test(date) ? date : localDateOf(Date.now(), this.zone()));
    if (time) this.minutes.set(Math.min(1425, Number(time[1]) * 60 + Number(time[2])));
    void this.router.navigate([], { queryParams: { site: id }, queryParamsHandling: 'merge', replaceUrl: true });
    this.loadLandscape();
    this.loadDay();
  }

  protected changed(): void {
    this.changes.next();
  }

  protected dateChanged(d: string): void {
    if (!/^\d{4}-\d{2}-\d{2}$/.test(d)) return;
    this.date.set(d);
    this.loadLandscape();
    this.loadDay();
  }

  protected showHour(iso: string): void {
    const local = siteTime(iso, this.zone()).slice(0, 5).split(':').map(Number) as [number, number];
    this.minutes.set(local[0] * 60 + local[1]);
    this.loadLandscape();
  }

  protected loadLandscape(): void {
    const id = this.siteId();
    if (id === null) return;
    this.request?.unsubscribe();
    this.loading.set(true);
    this.problem.set(null);
    this.request = this.api.landscape(id, new Date(this.atMs()), this.detectorTilt()).subscribe({
      next: (l) => {
        this.landscape.set(l);
        this.loading.set(false);
      },
      error: (e: unknown) => {
        this.problem.set(toApiProblem(e).message);
        this.loading.set(false);
      },
    });
  }

  protected loadDay(): void {
    const id = this.siteId();
    if (id === null) return;
    this.dayLoading.set(true);
    this.dayProblem.set(null);
    this.api.landscapeDay(id, this.date()).subscribe({
      next: (d) => {
        this.day.set(d);
        this.dayLoading.set(false);
      },
      error: (e: unknown) => {
        this.dayProblem.set(toApiProblem(e).message);
        this.dayLoading.set(false);
      },
    });
  }

  /** Bumped when a revision becomes the survey: the editor is made anew and loads the new survey. */
  protected readonly surveyVersion = signal(0);

  /** A survey revision was accepted: the survey changed on the server. */
  protected revisionAccepted(): void {
    this.surveyVersion.update((v) => v + 1);
    this.surveySaved();
  }

  /** The survey was saved: the model changed, so recompute. */
  protected surveySaved(): void {
    this.loadLandscape();
    this.loadDay();
  }
}
