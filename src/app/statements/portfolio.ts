import { DecimalPipe, PercentPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, OnInit, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import { forkJoin, of } from 'rxjs';
import { catchError, map, switchMap } from 'rxjs/operators';
import type { StatementTrend } from '../../../shared/contracts/statements';
import { SiteApi } from '../core/site-api';
import { StatementApi } from '../core/statement-api';
import { readPalette } from '../live/tone-palette';
import { ColourScheme } from '../shell/colour-scheme';
import { toApiProblem } from '../ui/api-error';
import { trendChart, trendRatesChart } from './statement-charts';

interface SiteTrend {
  trend: StatementTrend | null;
  problem: string | null;
  siteId: number;
  siteName: string;
}

/** An owner's home: each of their sites with this month so far and the twelve months before it. */
@Component({
  selector: 'bw-portfolio',
  imports: [DecimalPipe, PercentPipe, MatButtonModule, MatIconModule, MatProgressBarModule, NgxEchartsDirective, RouterLink],
  templateUrl: './portfolio.html',
  styleUrl: './statement-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Portfolio implements OnInit {
  private readonly sites = inject(SiteApi);
  private readonly statements = inject(StatementApi);
  private readonly scheme = inject(ColourScheme);

  protected readonly rows = signal<SiteTrend[]>([]);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly charts = computed(() => {
    void this.scheme.current();
    const p = readPalette();
    return this.rows().map((r) => (r.trend ? { energy: trendChart(r.trend.months, p), rates: trendRatesChart(r.trend.months, p) } : null));
  });

  ngOnInit(): void {
    this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.problem.set(null);
    this.sites
      .list()
      .pipe(
        switchMap((sites) =>
          sites.length
            ? forkJoin(
                [...sites]
                  .sort((a, b) => a.name.localeCompare(b.name))
                  .map((s) =>
                    this.statements.trend(s.id).pipe(
                      map((trend): SiteTrend => ({ trend, problem: null, siteId: s.id, siteName: s.name })),
                      catchError((e: unknown) =>
                        of<SiteTrend>({ trend: null, problem: toApiProblem(e).message, siteId: s.id, siteName: s.name }),
                      ),
                    ),
                  ),
              )
            : of([]),
        ),
      )
      .subscribe({
        next: (rows) => {
          this.rows.set(rows);
          this.loading.set(false);
        },
        error: (e: unknown) => {
          this.problem.set(toApiProblem(e).message);
          this.loading.set(false);
        },
      });
  }

  protected current(t: StatementTrend) {
    return t.months[t.months.length - 1]!;
  }
}
