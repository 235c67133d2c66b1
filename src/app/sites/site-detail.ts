import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { Site, Unit } from '../../../shared/contracts/api';
import { Session } from '../auth/session';
import { toApiProblem } from '../ui/api-error';
import { TableData } from '../ui/table-data';
import { LocationPipe } from './location-pipe';
import { SiteApi } from '../core/site-api';
import { UnitApi } from '../core/unit-api';

/** One site: its facts and its tracker units. Read-only; administrators edit under Site setup. */
@Component({
  selector: 'bw-site-detail',
  imports: [DecimalPipe, MatButtonModule, MatIconModule, MatProgressBarModule, MatSortModule, MatTableModule, RouterLink, LocationPipe],
  templateUrl: './site-detail.html',
  styleUrl: './site-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SiteDetail {
  private readonly sites = inject(SiteApi);
  private readonly unitApi = inject(UnitApi);
  private readonly session = inject(Session);

  /** Route parameter `:id`. */
  readonly id = input.required<string>();

  protected readonly site = signal<Site | null>(null);
  protected readonly loading = signal(true);
  protected readonly notFound = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly units = new TableData<Unit>();
  protected readonly isAdmin = computed(() => this.session.role() === 'admin');
  protected readonly columns = ['serial', 'ratedPowerWp', 'detectorTiltDeg', 'tilt', 'azimuth', 'firmware', 'disabled'];

  private readonly sort = viewChild(MatSort);

  constructor() {
    effect(() => this.load(Number(this.id())));
    effect(() => this.units.attach(this.sort(), undefined));
  }

  protected load(id: number): void {
    this.loading.set(true);
    this.notFound.set(false);
    this.problem.set(null);
    if (!Number.isInteger(id) || id <= 0) {
      this.notFound.set(true);
      this.loading.set(false);
      return;
    }
    this.sites.get(id).subscribe({
      next: (site) => {
        this.site.set(site);
        this.loading.set(false);
        this.units.load(this.unitApi.list(site.id));
      },
      error: (error: unknown) => {
        const problem = toApiProblem(error);
        if (problem.status === 404) this.notFound.set(true);
        else this.problem.set(problem.message);
        this.loading.set(false);
      },
    });
  }

  protected retry(): void {
    this.load(Number(this.id()));
  }

  /** Loads the unit list again after it failed (the site itself is already shown). */
  protected retryUnits(): void {
    const site = this.site();
    if (site) this.units.load(this.unitApi.list(site.id));
  }
}
