import { ChangeDetectionStrategy, Component, computed, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import type { HealthSettingsHistory, SiteHealthSettings } from '../../../shared/contracts/alarms';
import type { ApplyDetectorTiltUnit, DetectorTiltRecommendation } from '../../../shared/contracts/detector-tilt';
import { may } from '../../../shared/contracts/permissions';
import { Session } from '../auth/session';
import { AlarmApi } from '../core/alarm-api';
import { DetectorTiltApi } from '../core/detector-tilt-api';
import { SiteChoice } from '../sites/site-choice';
import { LiveConnection } from '../live/live-connection';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import { CommandConfirm, type CommandConfirmData, type CommandConfirmResult } from '../units/command-confirm';
import { CONFIGURE_CAUTION } from '../units/commands';
import { DetectorTiltPanel } from './detector-tilt-panel';
import { SettingsForm, type SettingsSave } from './settings-form';
import { SettingsHistory } from './settings-history';

/**
 * A site's health settings (every threshold, its range and why, editable with a reason by engineers and admins), the
 * history of their changes, and the detector tilt the site needs, sent to all its units.
 */
@Component({
  selector: 'bw-health-settings-page',
  imports: [
    DetectorTiltPanel,
    FormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatSelectModule,
    RouterLink,
    SettingsForm,
    SettingsHistory,
  ],
  templateUrl: './health-settings-page.html',
  styleUrl: './health-settings-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HealthSettingsPage {
  private readonly alarmApi = inject(AlarmApi);
  private readonly tiltApi = inject(DetectorTiltApi);
  private readonly session = inject(Session);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);
  private readonly live = inject(LiveConnection);
  private readonly destroyRef = inject(DestroyRef);

  private readonly siteChoice = new SiteChoice((id) => this.chooseSite(id));
  protected readonly sites = this.siteChoice.sites;
  protected readonly sitesLoaded = this.siteChoice.loaded;
  protected readonly sitesProblem = this.siteChoice.problem;
  protected readonly siteId = signal<number | null>(null);
  protected readonly site = computed(() => this.sites().find((s) => s.id === this.siteId()) ?? null);

  protected readonly settings = signal<SiteHealthSettings | null>(null);
  protected readonly settingsProblem = signal<string | null>(null);
  protected readonly saving = signal(false);
  protected readonly saveProblem = signal<string | null>(null);
  protected readonly fieldErrors = signal<Record<string, string>>({});
  protected readonly history = signal<HealthSettingsHistory | null>(null);
  protected readonly historyProblem = signal<string | null>(null);

  protected readonly recommendation = signal<DetectorTiltRecommendation | null>(null);
  protected readonly tiltLoading = signal(false);
  protected readonly tiltProblem = signal<string | null>(null);
  protected readonly applying = signal(false);
  protected readonly applied = signal<ApplyDetectorTiltUnit[] | null>(null);

  protected readonly canEdit = computed(() => may(this.session.role(), 'editHealthSettings'));
  protected readonly canTune = computed(() => may(this.session.role(), 'tuneDetectors'));
  private watching: number | null = null;

  constructor() {
    this.live.messages.pipe(takeUntilDestroyed()).subscribe((msg) => {
      if (msg.type !== 'command') return;
      const list = this.applied();
      if (!list?.some((u) => u.commandId === msg.command.id)) return;
      this.applied.set(
        list.map((u) => (u.commandId === msg.command.id ? { ...u, status: msg.command.status, reason: msg.command.reason } : u)),
      );
    });
    this.loadSites();
  }

  protected loadSites(): void {
    this.siteChoice.load();
  }

  protected chooseSite(id: number): void {
    this.siteId.set(id);
    this.settings.set(null);
    this.history.set(null);
    this.recommendation.set(null);
    this.tiltProblem.set(null);
    this.applied.set(null);
    this.fieldErrors.set({});
    this.saveProblem.set(null);
    void this.router.navigate([], { queryParams: { site: id }, queryParamsHandling: 'merge', replaceUrl: true });
    this.loadSettings();
    this.loadHistory();
  }

  protected loadSettings(): void {
    const id = this.siteId();
    if (id === null) return;
    this.settingsProblem.set(null);
    this.alarmApi.healthSettings(id).subscribe({
      next: (s) => {
        if (this.siteId() === id) this.settings.set(s);
      },
      error: (e: unknown) => this.settingsProblem.set(toApiProblem(e).message),
    });
  }

  protected loadHistory(): void {
    const id = this.siteId();
    if (id === null) return;
    this.historyProblem.set(null);
    this.alarmApi.healthSettingsHistory(id).subscribe({
      next: (h) => {
        if (this.siteId() === id) this.history.set(h);
      },
      error: (e: unknown) => this.historyProblem.set(toApiProblem(e).message),
    });
  }

  protected save(s: SettingsSave): void {
    const id = this.siteId();
    if (id === null) return;
    this.saving.set(true);
    this.saveProblem.set(null);
    this.alarmApi.saveHealthSettings(id, s.overrides, s.reason).subscribe({
      next: (saved) => {
        this.saving.set(false);
        this.fieldErrors.set({});
        this.settings.set(saved);
        this.notify.done(`Health settings of ${this.site()?.name ?? 'the site'} saved.`);
        this.loadHistory();
      },
      error: (e: unknown) => {
        this.saving.set(false);
        const p = toApiProblem(e);
        this.fieldErrors.set(p.fields);
        this.saveProblem.set(p.message);
      },
    });
  }

  protected computeTilt(): void {
    const id = this.siteId();
    if (id === null) return;
    this.tiltLoading.set(true);
    this.tiltProblem.set(null);
    this.tiltApi.recommendation(id, new Date().getUTCFullYear()).subscribe({
      next: (r) => {
        this.tiltLoading.set(false);
        if (this.siteId() === id) this.recommendation.set(r);
      },
      error: (e: unknown) => {
        this.tiltLoading.set(false);
        this.tiltProblem.set(toApiProblem(e).message);
      },
    });
  }

  protected applyTilt(detectorTiltDeg: number): void {
    const site = this.site();
    const r = this.recommendation();
    if (!site || !r) return;
    const n = r.units.filter((u) => !u.disabled).length;
    const data: CommandConfirmData = {
      serial: `all ${n} unit${n === 1 ? '' : 's'}`,
      siteName: site.name,
      title: `Send a detector tilt of ${detectorTiltDeg}° to ${site.name}?`,
      description:
        `Every enabled unit of ${site.name} (${n}) gets the new setting “detector tilt ${detectorTiltDeg}°” as its own command, ` +
        'at once or when it next connects; how each unit seeks and moves changes from then on.',
      caution: CONFIGURE_CAUTION,
      askClear: true,
      confirmLabel: `Send to ${n} unit${n === 1 ? '' : 's'}`,
      confirmIcon: 'send',
    };
    this.dialog
      .open<CommandConfirm, CommandConfirmData, CommandConfirmResult>(CommandConfirm, {
        data,
        width: '560px',
        maxWidth: '95vw',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((confirmed) => {
        if (!confirmed) return;
        if (this.watching !== site.id) {
          this.live.watch({ siteId: site.id }, this.destroyRef);
          this.watching = site.id;
        }
        this.applying.set(true);
        this.tiltApi.apply(site.id, detectorTiltDeg).subscribe({
          next: (res) => {
            this.applying.set(false);
            this.applied.set(res.units);
            this.notify.done(`Detector tilt ${detectorTiltDeg}° sent to the units of ${site.name}; their answers follow below.`);
          },
          error: (e: unknown) => {
            this.applying.set(false);
            this.notify.problem(`The detector tilt was not sent. ${toApiProblem(e).message}`);
          },
        });
      });
  }
}
