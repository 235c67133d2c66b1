import { ChangeDetectionStrategy, Component, computed, inject, InjectionToken, OnInit, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { User } from '../../../../shared/contracts/api';
import type { AuditLogEntry, AuditQuery } from '../../../../shared/contracts/audit';
import { siteTime, utcTime } from '../../live/unit-status';
import { toApiProblem } from '../../ui/api-error';
import { Notify } from '../../ui/notify';
import { UserApi } from '../../core/user-api';
import { AuditApi } from '../../core/audit-api';
import { ACTION_LOOKS, actionLook, detailText } from './audit-words';

/** The filters as the form holds them (`from`/`to` are `datetime-local` values in the reader's zone). */
interface Filters {
  action: string;
  userId: number | null;
  target: string;
  from: string;
  to: string;
}

const NO_FILTERS: Filters = { action: '', userId: null, target: '', from: '', to: '' };

/** The reader's own time zone (the browser's); entries are shown in it, with UTC on hover. */
export const VIEWER_TIME_ZONE = new InjectionToken<string>('viewer time zone', {
  providedIn: 'root',
  factory: () => Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC',
});

/** The audit log for admins: newest first, filtered and paged on the server. */
@Component({
  selector: 'bw-audit-page',
  imports: [
    FormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatTableModule,
    MatTooltipModule,
  ],
  templateUrl: './audit-page.html',
  styleUrl: './audit-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuditPage implements OnInit {
  private readonly api = inject(AuditApi);
  private readonly userApi = inject(UserApi);
  private readonly notify = inject(Notify);

  protected readonly zone = inject(VIEWER_TIME_ZONE);
  protected readonly columns = ['at', 'user', 'action', 'target', 'detail'];
  protected readonly actions = Object.entries(ACTION_LOOKS)
    .map(([value, look]) => ({ value, ...look }))
    .sort((a, b) => a.label.localeCompare(b.label));

  protected readonly filters = signal<Filters>({ ...NO_FILTERS });
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(50);
  protected readonly entries = signal<AuditLogEntry[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(false);
  protected readonly loaded = signal(false);
  protected readonly problem = signal<string | null>(null);
  /** Per-field messages of a refused query, shown under the matching filter. */
  protected readonly fieldProblems = signal<Record<string, string>>({});
  protected readonly people = signal<User[]>([]);
  /** Whether the filters are shown on a narrow screen (always shown on wider ones). */
  protected readonly filtersOpen = signal(false);
  protected readonly filtered = computed(() => JSON.stringify(this.filters()) !== JSON.stringify(NO_FILTERS));

  ngOnInit(): void {
    this.reload();
    this.userApi.list().subscribe({
      next: (users) => this.people.set([...users].sort((a, b) => a.name.localeCompare(b.name))),
      error: (error: unknown) => this.notify.problem(`People could not be loaded for the filter: ${toApiProblem(error).message}`),
    });
  }

  protected reload(): void {
    const f = this.filters();
    const localToIso = (v: string) => (v ? new Date(v).toISOString() : undefined);
    const query: AuditQuery = {
      action: f.action || undefined,
      userId: f.userId ?? undefined,
      target: f.target.trim() || undefined,
      from: localToIso(f.from),
      to: localToIso(f.to),
      limit: this.pageSize(),
      offset: this.pageIndex() * this.pageSize(),
    };
    this.loading.set(true);
    this.problem.set(null);
    this.fieldProblems.set({});
    this.api.list(query).subscribe({
      next: (page) => {
        this.entries.set(page.entries);
        this.total.set(page.total);
        this.loading.set(false);
        this.loaded.set(true);
      },
      error: (error: unknown) => {
        const p = toApiProblem(error);
        // Rows of the previous query would not match the filters now shown.
        this.entries.set([]);
        this.total.set(0);
        this.loading.set(false);
        this.problem.set(p.message);
        this.fieldProblems.set(p.fields);
      },
    });
  }

  protected setFilter<K extends keyof Filters>(key: K, value: Filters[K]): void {
    this.filters.update((f) => ({ ...f, [key]: value }));
    this.pageIndex.set(0);
    this.reload();
  }

  protected clearFilters(): void {
    this.filters.set({ ...NO_FILTERS });
    this.pageIndex.set(0);
    this.reload();
  }

  protected page(event: PageEvent): void {
    this.pageIndex.set(event.pageIndex);
    this.pageSize.set(event.pageSize);
    this.reload();
  }

  protected time(iso: string): string {
    return siteTime(iso, this.zone, true);
  }

  protected utc(iso: string): string {
    return utcTime(iso);
  }

  protected lookOf(action: string) {
    return actionLook(action);
  }

  protected detail(entry: AuditLogEntry): string {
    return detailText(entry, (iso) => this.time(iso));
  }

  /** The action filter's options: the known actions, plus the current one if the server named another. */
  protected actionOptions() {
    const current = this.filters().action;
    return current && !ACTION_LOOKS[current] ? [{ value: current, ...actionLook(current) }, ...this.actions] : this.actions;
  }
}
