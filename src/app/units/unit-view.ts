import { ChangeDetectionStrategy, Component, computed, DestroyRef, effect, inject, input, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import { interval } from 'rxjs';
import type { Site, Unit } from '../../../shared/contracts/api';
import type { SiteLandscape } from '../../../shared/contracts/landscape';
import type { CommandView, IssueCommandRequest, UnitLiveState } from '../../../shared/contracts/live';
import { HOLD_TEXT_MAX, type HoldView } from '../../../shared/contracts/holds';
import type { UnitConfig } from '../../../shared/contracts/wire';
import type { ScanResult } from '../../../shared/contracts/alarms';
import { may } from '../../../shared/contracts/permissions';
import { Session } from '../auth/session';
import { AlarmApi } from '../core/alarm-api';
import { CommandApi } from '../core/command-api';
import { LandscapeApi } from '../core/landscape-api';
import { SiteApi } from '../core/site-api';
import { TelemetryApi } from '../core/telemetry-api';
import { UnitApi } from '../core/unit-api';
import { LinkBadge } from '../live/link-badge';
import { LiveConnection } from '../live/live-connection';
import { ago, siteTime, statusLook, utcTime, withUnit } from '../live/unit-status';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import { CommandConfirm, type CommandConfirmData, type CommandConfirmResult } from './command-confirm';
import { CommandHistory } from './command-history';
import { CommandPanel } from './command-panel';
import {
  CONFIGURE_CAUTION,
  commandChoices,
  describeCommand,
  describeConfigure,
  describeRelease,
  HOLD_CAUTION,
  holderNames,
  isHeld,
  MOTION_CAUTION,
  ownHold,
  queuedNote,
  RELEASE_CAUTION,
  upsertCommand,
  type CommandChoice,
} from './commands';
import { HoldPanel } from './hold-panel';
import { appendLive, pointFromRow, type HourPoint } from './last-hour';
import { LastHourPanel } from './last-hour-panel';
import { PointingPanel } from './pointing-panel';
import { ScanPanel } from './scan-panel';
import { UnitAlarmsPanel } from './unit-alarms-panel';

/**
 * One unit, live: values, last hour, where it points against the modelled sky, holds, commands, alarms, scan and
 * history. The view loads the unit and follows it live; each panel shows its part, and every command goes through the
 * confirmation here. Owners get it read-only (`readOnly`): live values, the last hour and the unit's alarms, with no
 * commands, settings, scans, holds list or command history, and nothing loaded that only staff may read.
 */
@Component({
  selector: 'bw-unit-view',
  imports: [
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    MatTooltipModule,
    RouterLink,
    LinkBadge,
    LastHourPanel,
    PointingPanel,
    HoldPanel,
    CommandPanel,
    UnitAlarmsPanel,
    ScanPanel,
    CommandHistory,
  ],
  templateUrl: './unit-view.html',
  styleUrl: './unit-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitView {
  private readonly unitApi = inject(UnitApi);
  private readonly siteApi = inject(SiteApi);
  private readonly telemetryApi = inject(TelemetryApi);
  private readonly landscapeApi = inject(LandscapeApi);
  private readonly commandApi = inject(CommandApi);
  private readonly alarmApi = inject(AlarmApi);
  protected readonly session = inject(Session);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);
  private readonly destroyRef = inject(DestroyRef);
  private readonly live = inject(LiveConnection);

  /** Route parameter `:id`. */
  readonly id = input.required<string>();

  protected readonly unit = signal<Unit | null>(null);
  protected readonly site = signal<Site | null>(null);
  protected readonly state = signal<UnitLiveState | null>(null);
  protected readonly loading = signal(true);
  protected readonly notFound = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly hour = signal<HourPoint[]>([]);
  protected readonly hourLoading = signal(true);
  protected readonly landscape = signal<SiteLandscape | null>(null);
  protected readonly landscapeProblem = signal<string | null>(null);
  protected readonly commands = signal<CommandView[]>([]);
  protected readonly commandsProblem = signal<string | null>(null);
  protected readonly sending = signal<string | null>(null);
  protected readonly now = signal(Date.now());
  protected readonly gotoTilt = signal<number | null>(null);
  protected readonly gotoAzimuth = signal<number | null>(null);
  /** Scan and relocate: the scan command sent from here, and the latest scan result. */
  protected readonly scanCommand = signal<CommandView | null>(null);
  protected readonly scan = signal<ScanResult | null>(null);
  protected readonly scanLoading = signal(false);
  protected readonly scanProblem = signal<string | null>(null);
  /** The holds in force (from `GET …/holds`, then from the live state); null while loading. */
  protected readonly holds = signal<HoldView[] | null>(null);
  protected readonly holdsProblem = signal<string | null>(null);

  /** Owners: the page shows the unit and does nothing to it. */
  protected readonly readOnly = computed(() => !may(this.session.role(), 'command'));
  /** The modelled best in-plane irradiance now [W/m²]: from the landscape for staff, the one number for owners. */
  protected readonly bestNowWm2 = signal<number | null>(null);
  protected readonly canAcknowledge = computed(() => may(this.session.role(), 'acknowledgeAlarms'));
  protected readonly scanChoice = computed(() => this.choices().find((c) => c.kind === 'scan')!);
  protected readonly gotoChoice = computed(() => this.choices().find((c) => c.kind === 'goto')!);

  protected readonly look = computed(() => statusLook(this.state()));
  protected readonly meId = computed(() => this.session.me()?.id ?? null);
  protected readonly onHold = computed(() => isHeld(this.state()) || (this.holds()?.length ?? 0) > 0);
  /** The unit reports that it is held while no hold is in force here (a hold set on the unit itself). */
  protected readonly reportedHeld = computed(() => this.state()?.mode === 'held' && !(this.holds()?.length ?? 0));
  protected readonly choices = computed(() => {
    const s = this.state();
    const holds = this.holds() ?? s?.holds ?? [];
    return commandChoices(this.session.role(), s ? { ...s, holds, onHold: s.onHold || holds.length > 0 } : null, this.meId(), holds);
  });
  protected readonly canSeeTraces = computed(() => may(this.session.role(), 'readTraces'));
  protected readonly canSeeModel = computed(() => may(this.session.role(), 'readModelDetails'));
  protected readonly zone = computed(() => this.site()?.timeZone ?? 'UTC');
  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly ago = ago;
  protected readonly withUnit = withUnit;
  protected readonly canSendCommands = computed(() => may(this.session.role(), 'commandMotion'));
  protected readonly canTuneSite = computed(() => may(this.session.role(), 'tuneDetectors'));
  protected readonly holderNames = holderNames;
  /** The unit has reported and is offline now: commands wait in the queue. */
  protected readonly offline = computed(() => {
    const s = this.state();
    return !!s && !s.online;
  });

  constructor() {
    effect(() => {
      const id = Number(this.id());
      untracked(() => this.load(id));
    });
    this.live.messages.pipe(takeUntilDestroyed()).subscribe((msg) => {
      const u = this.unit();
      if (!u) return;
      if (msg.type === 'snapshot' || msg.type === 'units') {
        const s = msg.units.find((x) => x.unitId === u.id);
        if (s) {
          this.state.set(s);
          if (s.holds) {
            this.holds.set(s.holds);
            this.holdsProblem.set(null);
          }
          this.hour.set(appendLive(this.hour(), s));
        }
      } else if (msg.type === 'command' && msg.command.unitId === u.id) {
        this.commands.set(upsertCommand(this.commands(), msg.command));
        if (msg.command.id === this.scanCommand()?.id) {
          this.scanCommand.set(msg.command);
          if (msg.command.status === 'completed') this.loadScan(msg.command.id);
        }
      }
    });
    interval(5000)
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.now.set(Date.now()));
    interval(300_000)
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.loadLandscape());
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
    this.unitApi.get(id).subscribe({
      next: (unit) => {
        this.unit.set(unit);
        this.loading.set(false);
        this.live.watch({ unitId: unit.id }, this.destroyRef);
        this.siteApi.get(unit.siteId).subscribe({ next: (s) => this.site.set(s), error: () => undefined });
        this.unitApi.state(unit.id).subscribe({ next: (s) => s && this.state.set(s), error: () => undefined });
        this.loadHour(unit.id);
        this.loadLandscape();
        if (this.readOnly()) return;
        this.loadCommands();
        this.loadHolds();
        this.loadScan();
      },
      error: (e: unknown) => {
        const p = toApiProblem(e);
        if (p.status === 404) this.notFound.set(true);
        else this.problem.set(p.message);
        this.loading.set(false);
      },
    });
  }

  private loadHour(unitId: number): void {
    const to = new Date(Date.now() + 60_000);
    this.hourLoading.set(true);
    this.telemetryApi.telemetry(unitId, new Date(to.getTime() - 3_660_000), to).subscribe({
      next: (rows) => {
        const merged = [...rows.map(pointFromRow), ...this.hour()]
          .sort((a, b) => a.t - b.t)
          .filter((p, i, a) => i === 0 || p.t !== a[i - 1]!.t);
        this.hour.set(merged);
        this.hourLoading.set(false);
      },
      error: () => this.hourLoading.set(false),
    });
  }

  protected loadLandscape(): void {
    const u = this.unit();
    if (!u) return;
    this.landscapeProblem.set(null);
    if (this.readOnly()) {
      this.landscapeApi.bestNow(u.siteId).subscribe({ next: (b) => this.bestNowWm2.set(b.wm2), error: () => undefined });
      return;
    }
    this.landscapeApi.landscape(u.siteId, new Date(), u.detectorTiltDeg, false, 3).subscribe({
      next: (l) => {
        this.landscape.set(l);
        this.bestNowWm2.set(l.globalMax.wm2);
        if (this.gotoTilt() === null) {
          this.gotoTilt.set(l.globalMax.tiltDeg);
          this.gotoAzimuth.set(l.globalMax.azimuthDeg);
        }
      },
      error: (e: unknown) => this.landscapeProblem.set(toApiProblem(e).message),
    });
  }

  private loadCommands(): void {
    const u = this.unit();
    if (!u) return;
    this.commandApi.commands(u.id).subscribe({
      next: (list) => this.commands.set(list.reduce((acc, c) => upsertCommand(acc, c), [] as CommandView[])),
      error: (e: unknown) => this.commandsProblem.set(toApiProblem(e).message),
    });
  }

  protected loadHolds(): void {
    const u = this.unit();
    if (!u) return;
    this.holdsProblem.set(null);
    this.commandApi.holds(u.id).subscribe({
      next: (h) => this.holds.set(h.active),
      error: (e: unknown) => this.holdsProblem.set(toApiProblem(e).message),
    });
  }

  protected gotoValid(): boolean {
    const t = this.gotoTilt();
    const a = this.gotoAzimuth();
    return t !== null && a !== null && t >= 0 && t <= 90 && a >= 0 && a <= 360;
  }

  /** Loads the unit's latest scan (or one command's); 404 means there is none yet. */
  protected loadScan(commandId?: string): void {
    const u = this.unit();
    if (!u) return;
    this.scanLoading.set(true);
    this.scanProblem.set(null);
    this.alarmApi.latestScan(u.id, commandId).subscribe({
      next: (s) => {
        this.scan.set(s);
        this.scanLoading.set(false);
      },
      error: (e: unknown) => {
        const p = toApiProblem(e);
        this.scanLoading.set(false);
        this.scanProblem.set(
          p.status === 404
            ? commandId
              ? 'The unit has not reported samples for this scan yet.'
              : 'This unit has no scan yet. Send one first.'
            : `The scan could not be loaded. ${p.message}`,
        );
      },
    });
  }

  /** Puts the trap alarm's modelled best into the go-to fields. */
  protected useAsTarget(tiltDeg: number, azimuthDeg: number): void {
    this.gotoTilt.set(Math.round(tiltDeg * 10) / 10);
    this.gotoAzimuth.set(Math.round(azimuthDeg * 10) / 10);
    this.notify.done(`Go-to target set to tilt ${this.gotoTilt()}°, azimuth ${this.gotoAzimuth()}°. Nothing is sent until you confirm.`);
  }

  /** Sends the scan's ready go-to through the confirmation. */
  protected gotoBrightest(): void {
    const s = this.scan();
    if (!s) return;
    this.send(this.gotoChoice(), { tiltDeg: s.goto.tiltDeg, azimuthDeg: s.goto.azimuthDeg }, 'Go to the brightest orientation');
  }

  protected send(choice: CommandChoice, explicitTarget?: { tiltDeg: number; azimuthDeg: number }, label = choice.label): void {
    const u = this.unit();
    if (!u || choice.disabledReason) return;
    if (choice.kind === 'goto' && !explicitTarget && !this.gotoValid()) {
      this.notify.problem('Enter a tilt between 0 and 90° and an azimuth between 0 and 360°.');
      return;
    }
    const target = choice.kind === 'goto' ? (explicitTarget ?? { tiltDeg: this.gotoTilt()!, azimuthDeg: this.gotoAzimuth()! }) : undefined;
    const holds = this.holds() ?? [];
    const mine = ownHold(holds, this.meId());
    if (choice.kind === 'release-hold') {
      if (mine) this.releaseHold(mine);
      return;
    }
    this.confirmThen(
      {
        title: `${label} — ${u.serial}?`,
        description: describeCommand(u.serial, choice.kind, target),
        caution: choice.motion ? MOTION_CAUTION : HOLD_CAUTION,
        askClear: choice.motion,
        confirmLabel: label,
        confirmIcon: choice.icon,
        ...(choice.kind === 'hold'
          ? {
              text: {
                label: 'Note (optional)',
                hint: 'What the work is. Everyone who sees the unit reads it.',
                required: false,
                maxLength: HOLD_TEXT_MAX,
              },
            }
          : {}),
      },
      (r) => ({
        kind: choice.kind,
        ...target,
        ...(choice.motion ? { confirm: true } : {}),
        ...(choice.kind === 'hold' && r.text ? { note: r.text } : {}),
      }),
      label,
    );
  }

  /** Releases a hold: one's own, or (admins) someone else's with a reason. Releasing the last hold lets the unit move. */
  protected releaseHold(hold: HoldView): void {
    const u = this.unit();
    if (!u) return;
    const own = hold.holder.kind === 'person' && hold.holder.id === this.meId();
    const label = own ? 'Release my hold' : `Release the hold of ${hold.holder.name}`;
    this.confirmThen(
      {
        title: `${label} — ${u.serial}?`,
        description: describeRelease(u.serial, hold, this.holds() ?? [hold], this.meId()),
        caution: RELEASE_CAUTION,
        askClear: true,
        confirmLabel: own ? 'Release my hold' : 'Release this hold',
        confirmIcon: 'play_circle',
        ...(own
          ? {}
          : {
              text: {
                label: 'Reason (required)',
                hint: `Why you release a hold that is not yours. ${hold.holder.name} and the audit log see it.`,
                required: true,
                maxLength: HOLD_TEXT_MAX,
              },
            }),
      },
      (r) => ({ kind: 'release-hold', confirm: true, ...(own ? {} : { holdId: hold.id, reason: r.text }) }),
      label,
    );
  }

  /** Sends the settings from the form through the confirmation. */
  protected sendSettings(config: UnitConfig): void {
    const u = this.unit();
    if (!u) return;
    this.confirmThen(
      {
        title: `Send new settings — ${u.serial}?`,
        description: describeConfigure(u.serial, config),
        caution: CONFIGURE_CAUTION,
        askClear: true,
        confirmLabel: 'Send settings',
        confirmIcon: 'tune',
      },
      () => ({ kind: 'configure', config, confirm: true }),
      'New settings',
    );
  }

  private confirmThen(
    d: Omit<CommandConfirmData, 'serial' | 'siteName'>,
    request: (r: CommandConfirmResult) => IssueCommandRequest,
    label: string,
  ): void {
    const u = this.unit();
    if (!u) return;
    const data: CommandConfirmData = { serial: u.serial, siteName: this.site()?.name ?? u.siteName, ...d };
    this.dialog
      .open<CommandConfirm, CommandConfirmData, CommandConfirmResult>(CommandConfirm, {
        data,
        width: '560px',
        maxWidth: '95vw',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((r) => {
        if (!r) return;
        const req = request(r);
        this.sending.set(req.kind);
        this.commandApi.issue(u.id, req).subscribe({
          next: (c) => {
            this.sending.set(null);
            this.commands.set(upsertCommand(this.commands(), c));
            if (c.kind === 'scan') {
              this.scanCommand.set(c);
              this.scanProblem.set(null);
            }
            if (c.kind === 'hold' || c.kind === 'release-hold') this.loadHolds();
            const waiting = queuedNote(c, this.zone());
            this.notify.done(
              waiting
                ? `${label} for ${u.serial}. ${waiting}`
                : c.status === 'completed' && !c.sentAt
                  ? `${label}: done. ${c.reason ?? ''}`
                  : `${label}: sent to ${u.serial}.`,
            );
          },
          error: (e: unknown) => {
            this.sending.set(null);
            this.notify.problem(`${label} was not sent. ${toApiProblem(e).message}`);
            if (req.kind === 'hold' || req.kind === 'release-hold') this.loadHolds();
          },
        });
      });
  }
}
