import { ChangeDetectionStrategy, Component, computed, inject, OnInit, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { Site } from '../../../shared/contracts/api';
import { Session } from '../auth/session';
import { toApiProblem } from '../ui/api-error';
import { LocationPipe } from './location-pipe';
import { SiteApi } from '../core/site-api';

/** The sites the user may see, as cards; the start page for every role for now. */
@Component({
  selector: 'bw-site-list',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, RouterLink, LocationPipe],
  templateUrl: './site-list.html',
  styleUrl: './site-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SiteList implements OnInit {
  private readonly api = inject(SiteApi);
  private readonly session = inject(Session);

  protected readonly sites = signal<Site[]>([]);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly query = signal('');
  protected readonly isAdmin = computed(() => this.session.role() === 'admin');
  protected readonly isOwner = computed(() => this.session.role() === 'owner');
  protected readonly shown = computed(() => {
    const query = this.query().trim().toLowerCase();
    const sites = [...this.sites()].sort((a, b) => a.name.localeCompare(b.name));
    return query ? sites.filter((site) => `${site.name} ${site.ownerName} ${site.timeZone}`.toLowerCase().includes(query)) : sites;
  });

  ngOnInit(): void {
    this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.problem.set(null);
    this.api.list().subscribe({
      next: (sites) => {
        this.sites.set(sites);
        this.loading.set(false);
      },
      error: (error: unknown) => {
        this.problem.set(toApiProblem(error).message);
        this.loading.set(false);
      },
    });
  }
}
