import { DecimalPipe, PercentPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import { may } from '../../../shared/contracts/permissions';
import {
  STATEMENT_LOCK_DAY,
  STATEMENT_LOCK_HOUR,
  type MonthlyStatement,
  type StatementMonthList,
} from '../../../shared/contracts/statements';
import type { AvailabilityCategory } from '../../../shared/contracts/tickets';
import { StatementApi } from '../core/statement-api';
import { Session } from '../auth/session';
import { readPalette } from '../live/tone-palette';
import { ColourScheme } from '../shell/colour-scheme';
import { toApiProblem } from '../ui/api-error';
import { dailyChart } from './statement-charts';

/** Plain words for the IEC TS 63019 categories on the statement. */
export const CATEGORY_WORDS: Record<AvailabilityCategory, string> = {
  'full-performance': 'Full performance',
  'partial-performance': 'Partial performance',
  'technical-standby': 'Technical standby',
  'requested-shutdown': 'Shutdown at the owner’s request',
  'out-of-environmental-specification': 'Out of environmental specification',
  'out-of-electrical-specification': 'Out of electrical specification',
  'scheduled-maintenance': 'Scheduled maintenance',
  'planned-corrective-action': 'Planned corrective action',
  'forced-outage': 'Forced outage',
  suspended: 'Suspended',
  'force-majeure': 'Force majeure',
  'information-unavailable': 'Information unavailable',
};

export const SOURCE_WORDS: Record<string, string> = {
  ticket: 'Ticket',
  'wind-stow': 'Wind stow',
  hold: 'Maintenance hold',
  comms: 'No reports',
  stall: 'Actuator stall',
  fault: 'Unit fault',
};

/** A site's monthly statement: headline figures, the daily chart and table, availability, losses, gains, tickets. */
@Component({
  selector: 'bw-statement-page',
  imports: [
    DecimalPipe,
    PercentPipe,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    NgxEchartsDirective,
    RouterLink,
  ],
  templateUrl: './statement-page.html',
  styleUrl: './statement-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class StatementPage {
  private readonly api = inject(StatementApi);
  private readonly router = inject(Router);
  private readonly scheme = inject(ColourScheme);
  private readonly session = inject(Session);

  /** Route parameters `:id` and (optional) `:month`. */
  readonly id = input.required<string>();
  readonly month = input<string>();

  protected readonly months = signal<StatementMonthList | null>(null);
  protected readonly statement = signal<MonthlyStatement | null>(null);
  protected readonly loading = signal(true);
  protected readonly notFound = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly siteId = computed(() => Number(this.id()));
  /** Whether the month list is in (a fresh list after a restatement reloads no statement). */
  private readonly monthsLoaded = computed(() => this.months() !== null);
  protected readonly shownMonth = computed(() => this.month() ?? this.months()?.months[0]?.month ?? null);
  protected readonly chart = computed(() => {
    void this.scheme.current();
    const s = this.statement();
    return s ? dailyChart(s.days, readPalette()) : null;
  });
  /** The version shown of a locked month (null: the one in force). */
  protected readonly version = signal<number | null>(null);
  /** Downloads of what is shown: the version shown of a locked month, else the month as it stands. */
  protected readonly csvUrl = computed(() => {
    const m = this.shownMonth();
    return m ? this.api.csvUrl(this.siteId(), m, this.version()) : null;
  });
  protected readonly pdfUrl = computed(() => {
    const m = this.shownMonth();
    return m ? this.api.pdfUrl(this.siteId(), m, this.version()) : null;
  });
  protected readonly canRestate = computed(() => may(this.session.role(), 'restateStatements'));
  protected readonly restateReason = signal('');
  protected readonly restating = signal(false);
  protected readonly restateProblem = signal<string | null>(null);
  protected readonly lockWhen = `the ${STATEMENT_LOCK_DAY}rd of the next month at 0${STATEMENT_LOCK_HOUR}:00 site time`;
  protected readonly categoryWords = CATEGORY_WORDS;
  protected readonly sourceWords = SOURCE_WORDS;

  constructor() {
    effect(() => this.loadMonths(this.siteId()));
    effect(() => {
      const m = this.shownMonth();
      const v = this.version();
      if (m && this.monthsLoaded()) this.loadStatement(this.siteId(), m, v);
    });
  }

  /** Shows an earlier version of the locked month (null: the one in force). */
  protected showVersion(v: number | null): void {
    this.version.set(v);
  }

  /** Restates the month shown with the reason typed; the new version is then shown. */
  protected restate(): void {
    const s = this.statement();
    const reason = this.restateReason().trim();
    if (!s || reason.length < 3) {
      this.restateProblem.set('Say why the month is restated (at least 3 characters).');
      return;
    }
    this.restating.set(true);
    this.restateProblem.set(null);
    this.api.restate(s.siteId, s.month, reason).subscribe({
      next: (next) => {
        this.restating.set(false);
        this.restateReason.set('');
        this.version.set(null);
        this.statement.set(next);
        this.api.months(s.siteId).subscribe({ next: (list) => this.months.set(list), error: () => undefined });
      },
      error: (e: unknown) => {
        this.restating.set(false);
        this.restateProblem.set(toApiProblem(e).message);
      },
    });
  }

  protected retry(): void {
    this.loadMonths(this.siteId());
  }

  protected pick(month: string): void {
    this.version.set(null);
    void this.router.navigate(['/sites', this.siteId(), 'statements', month]);
  }

  private loadMonths(id: number): void {
    this.loading.set(true);
    this.problem.set(null);
    this.notFound.set(false);
    this.statement.set(null);
    if (!Number.isInteger(id) || id <= 0) {
      this.notFound.set(true);
      this.loading.set(false);
      return;
    }
    this.api.months(id).subscribe({
      next: (list) => {
        this.months.set(list);
        if (!list.months.length) this.loading.set(false);
      },
      error: (e: unknown) => this.fail(e),
    });
  }

  private loadStatement(id: number, month: string, version: number | null): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.statement(id, month, version).subscribe({
      next: (s) => {
        this.statement.set(s);
        this.loading.set(false);
      },
      error: (e: unknown) => this.fail(e),
    });
  }

  private fail(e: unknown): void {
    const p = toApiProblem(e);
    if (p.status === 404) this.notFound.set(true);
    else this.problem.set(p.message);
    this.loading.set(false);
  }
}
