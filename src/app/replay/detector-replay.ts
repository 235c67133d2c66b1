import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { Unit } from '../../../shared/contracts/api';
import type { DetectorRunResult } from '../../../shared/contracts/alarms';
import { AlarmApi } from '../core/alarm-api';
import { SiteChoice } from '../sites/site-choice';
import { UnitApi } from '../core/unit-api';
import { utcTime } from '../live/unit-status';
import { localDateOf, zonedMidnightUtc } from '../traces/trace-charts';
import { toApiProblem } from '../ui/api-error';
import { ReplayResults } from './replay-results';

/** The longest range the server runs [h]. */
export const REPLAY_MAX_HOURS = 48;

/** The instants of a range given in site time: a day, a start "HH:MM" and a length in hours; null when not valid. */
export function replayRange(date: string, start: string, hours: number, timeZone: string): { from: string; to: string } | null {
  const m = /^(\d{2}):(\d{2})$/.exec(start);
  if (!/^\d{4}-\d{2}-\d{2}$/.test(date) || !m || !Number.isFinite(hours) || hours <= 0 || hours > REPLAY_MAX_HOURS) return null;
  const from = zonedMidnightUtc(date, timeZone) + (Number(m[1]) * 60 + Number(m[2])) * 60_000;
  if (!Number.isFinite(from)) return null;
  return { from: new Date(from).toISOString(), to: new Date(from + hours * 3_600_000).toISOString() };
}

/**
 * Replay: the fleet health detectors, as they are set now, run over stored telemetry of chosen units and a range; the
 * alarms they would raise beside the ones stored. Nothing is stored or sent.
 */
@Component({
  selector: 'bw-detector-replay',
  imports: [
    FormsModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    ReplayResults,
    RouterLink,
  ],
  templateUrl: './detector-replay.html',
  styleUrl: './detector-replay.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DetectorReplay {
  private readonly unitApi = inject(UnitApi);
  private readonly alarmApi = inject(AlarmApi);
  private readonly router = inject(Router);

  private readonly siteChoice = new SiteChoice((id) => this.chooseSite(id));
  protected readonly sites = this.siteChoice.sites;
  protected readonly sitesLoaded = this.siteChoice.loaded;
  protected readonly sitesProblem = this.siteChoice.problem;
  protected readonly siteId = signal<number | null>(null);
  protected readonly site = computed(() => this.sites().find((s) => s.id === this.siteId()) ?? null);
  protected readonly zone = computed(() => this.site()?.timeZone ?? 'UTC');
  protected readonly units = signal<Unit[] | null>(null);
  protected readonly unitsProblem = signal<string | null>(null);
  protected readonly chosen = signal<ReadonlySet<number>>(new Set());

  protected readonly date = signal(localDateOf(Date.now(), 'UTC'));
  protected readonly start = signal('08:00');
  protected readonly hours = signal(6);
  protected readonly range = computed(() => replayRange(this.date(), this.start(), Number(this.hours()), this.zone()));

  protected readonly running = signal(false);
  protected readonly result = signal<DetectorRunResult | null>(null);
  protected readonly runProblem = signal<string | null>(null);
  protected readonly ready = computed(() => !this.running() && !!this.range() && this.chosen().size > 0);
  protected readonly maxHours = REPLAY_MAX_HOURS;
  protected readonly utcTime = utcTime;

  constructor() {
    this.loadSites();
  }

  protected loadSites(): void {
    this.siteChoice.load();
  }

  protected chooseSite(id: number): void {
    this.siteId.set(id);
    this.units.set(null);
    this.chosen.set(new Set());
    this.result.set(null);
    this.runProblem.set(null);
    this.date.set(localDateOf(Date.now(), this.zone()));
    void this.router.navigate([], { queryParams: { site: id }, queryParamsHandling: 'merge', replaceUrl: true });
    this.loadUnits();
  }

  protected loadUnits(): void {
    const id = this.siteId();
    if (id === null) return;
    this.unitsProblem.set(null);
    this.unitApi.list(id).subscribe({
      next: (units) => {
        if (this.siteId() !== id) return;
        this.units.set(units);
        this.chosen.set(new Set(units.filter((u) => !u.disabled).map((u) => u.id)));
      },
      error: (e: unknown) => this.unitsProblem.set(toApiProblem(e).message),
    });
  }

  protected toggle(unitId: number, on: boolean): void {
    const next = new Set(this.chosen());
    if (on) next.add(unitId);
    else next.delete(unitId);
    this.chosen.set(next);
  }

  protected chooseAll(on: boolean): void {
    this.chosen.set(new Set(on ? (this.units() ?? []).map((u) => u.id) : []));
  }

  protected run(): void {
    const range = this.range();
    if (!this.ready() || !range) return;
    this.running.set(true);
    this.runProblem.set(null);
    this.result.set(null);
    this.alarmApi.runDetectors({ ...range, unitIds: [...this.chosen()] }).subscribe({
      next: (r) => {
        this.running.set(false);
        this.result.set(r);
      },
      error: (e: unknown) => {
        this.running.set(false);
        const p = toApiProblem(e);
        const fields = Object.values(p.fields);
        this.runProblem.set(fields.length ? `${p.message} ${fields.join(' ')}` : p.message);
      },
    });
  }
}
