import { ChangeDetectionStrategy, Component, computed, inject, OnInit, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { ALARM_SEVERITIES, type AlarmSeverity } from '../../../shared/contracts/alarms';
import type { Site } from '../../../shared/contracts/api';
import type { NotificationSettings, OnCallEntry, OnCallRota } from '../../../shared/contracts/notifications';
import { may } from '../../../shared/contracts/permissions';
import { Session } from '../auth/session';
import { NotificationApi } from '../core/notification-api';
import { SiteApi } from '../core/site-api';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';

/** An ISO instant for a `datetime-local` value (the reader's zone). */
const fromLocalInput = (v: string) => new Date(v).toISOString();

/** My notifications: which sites and severities, by e-mail and/or in the dashboard; and, for the control room, the on-call rota. */
@Component({
  selector: 'bw-notification-settings-page',
  imports: [
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatRadioModule,
    MatSelectModule,
    MatSlideToggleModule,
  ],
  templateUrl: './notification-settings-page.html',
  styleUrl: './notification-settings-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationSettingsPage implements OnInit {
  private readonly api = inject(NotificationApi);
  private readonly siteApi = inject(SiteApi);
  private readonly notify = inject(Notify);
  private readonly session = inject(Session);

  protected readonly severityList = ALARM_SEVERITIES;
  protected readonly sites = signal<Site[]>([]);
  protected readonly settings = signal<NotificationSettings | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly fieldProblems = signal<Record<string, string>>({});
  protected readonly saving = signal(false);

  protected readonly mayEditRota = computed(() => may(this.session.role(), 'manageOnCall'));
  protected readonly rota = signal<OnCallRota | null>(null);
  protected readonly draft = signal<OnCallEntry[]>([]);
  protected readonly rotaProblems = signal<Record<string, string>>({});
  protected readonly rotaProblem = signal<string | null>(null);
  protected readonly newEntry = signal({ userId: 0, siteId: 0, from: '', to: '' });

  ngOnInit(): void {
    this.siteApi.list().subscribe({ next: (s) => this.sites.set(s), error: () => this.sites.set([]) });
    this.api.settings().subscribe({
      next: (s) => this.settings.set(s),
      error: (error: unknown) => this.problem.set(toApiProblem(error).message),
    });
    if (this.mayEditRota()) this.loadRota();
  }

  protected patch(change: Partial<NotificationSettings>): void {
    const s = this.settings();
    if (s) this.settings.set({ ...s, ...change });
  }

  protected toggleSeverity(sev: AlarmSeverity, on: boolean): void {
    const s = this.settings();
    if (!s) return;
    this.patch({ severities: on ? [...new Set([...s.severities, sev])] : s.severities.filter((x) => x !== sev) });
  }

  protected save(): void {
    const s = this.settings();
    if (!s) return;
    this.saving.set(true);
    this.fieldProblems.set({});
    this.api.saveSettings(s).subscribe({
      next: (saved) => {
        this.settings.set(saved);
        this.saving.set(false);
        this.notify.done('Notification settings saved.');
      },
      error: (error: unknown) => {
        const p = toApiProblem(error);
        this.saving.set(false);
        this.fieldProblems.set(p.fields);
        this.notify.problem(p.message);
      },
    });
  }

  protected siteName(id: number | null): string {
    return id === null ? 'Whole fleet' : (this.sites().find((s) => s.id === id)?.name ?? `Site ${id}`);
  }

  protected personName(id: number): string {
    return this.rota()?.candidates.find((p) => p.id === id)?.name ?? `Person ${id}`;
  }

  protected isNow(e: OnCallEntry): boolean {
    const now = Date.now();
    return Date.parse(e.from) <= now && now < Date.parse(e.to);
  }

  protected local(iso: string): string {
    return new Date(iso).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'short' });
  }

  protected setNew(change: Partial<{ userId: number; siteId: number; from: string; to: string }>): void {
    this.newEntry.update((e) => ({ ...e, ...change }));
  }

  protected addEntry(): void {
    const e = this.newEntry();
    if (!e.userId || !e.from || !e.to) {
      this.rotaProblem.set('Choose a person and give both times.');
      return;
    }
    this.rotaProblem.set(null);
    this.draft.update((list) => [
      ...list,
      { userId: e.userId, siteId: e.siteId || null, from: fromLocalInput(e.from), to: fromLocalInput(e.to) },
    ]);
  }

  protected removeEntry(i: number): void {
    this.draft.update((list) => list.filter((_, j) => j !== i));
  }

  protected saveRota(): void {
    this.rotaProblems.set({});
    this.api.saveRota(this.draft()).subscribe({
      next: (r) => {
        this.setRota(r);
        this.notify.done('On-call rota saved.');
      },
      error: (error: unknown) => {
        const p = toApiProblem(error);
        this.rotaProblems.set(p.fields);
        this.rotaProblem.set(p.message);
      },
    });
  }

  private loadRota(): void {
    this.api.rota().subscribe({
      next: (r) => this.setRota(r),
      error: (error: unknown) => this.rotaProblem.set(toApiProblem(error).message),
    });
  }

  private setRota(r: OnCallRota): void {
    this.rota.set(r);
    this.draft.set(r.entries.map((e) => ({ userId: e.userId, siteId: e.siteId, from: e.from, to: e.to })));
  }
}
