import { inject, signal } from '@angular/core';
import { ActivatedRoute } from '@angular/router';
import type { Site } from '../../../shared/contracts/api';
import { SiteApi } from '../core/site-api';
import { toApiProblem } from '../ui/api-error';

/**
 * A screen's list of sites to choose from: loads the sites the person may see, says when that failed, and chooses the
 * one the address names (`?site=`), else `fallback`'s pick. Made in a component's field initialiser (it injects).
 */
export class SiteChoice {
  readonly sites = signal<Site[]>([]);
  /** Whether the list has arrived (an empty list then means there are no sites). */
  readonly loaded = signal(false);
  readonly problem = signal<string | null>(null);
  private readonly api = inject(SiteApi);
  private readonly route = inject(ActivatedRoute);

  constructor(
    private readonly choose: (siteId: number) => void,
    private readonly fallback: (sites: Site[]) => Site | undefined = (sites) => sites[0],
  ) {}

  load(): void {
    this.problem.set(null);
    this.api.list().subscribe({
      next: (sites) => {
        this.sites.set(sites);
        this.loaded.set(true);
        const wanted = Number(this.route.snapshot.queryParamMap.get('site'));
        const first = sites.find((s) => s.id === wanted) ?? this.fallback(sites);
        if (first) this.choose(first.id);
      },
      error: (e: unknown) => this.problem.set(toApiProblem(e).message),
    });
  }
}
