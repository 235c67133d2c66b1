import { ChangeDetectionStrategy, Component, computed, DestroyRef, effect, inject, input, signal, untracked } from '@angular/core';
import { DecimalPipe, LowerCasePipe } from '@angular/common';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import { NgxEchartsDirective } from 'ngx-echarts';
import { interval } from 'rxjs';
import type { Site, Unit } from '../../../shared/contracts/api';
import type { SiteLandscape } from '../../../shared/contracts/landscape';
import type { CommandView, IssueCommandRequest, UnitLiveState } from '../../../shared/contracts/live';
import { HOLD_TEXT_MAX, type HoldView } from '../../../shared/contracts/holds';
import type { UnitConfig } from '../../../shared/contracts/wire';
import { Session } from '../auth/session';
import { SiteApi } from '../sites/site-api';
import { UnitApi } from '../sites/unit-api';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';
import type { ScanResult } from '../../../shared/contracts/alarms';
import { may } from '../../../shared/contracts/permissions';
import { AlarmCard } from '../alarms/alarm-card';
import { AlarmApi, toAlarmView, type AlarmView } from '../live/alarm-api';
import { alarmKindLabel, severityLook, sortAlarms, trapFinding, upsertAlarm } from '../live/alarm-look';
import { FleetApi } from '../live/fleet-api';
import { LinkBadge } from '../live/link-badge';
import { LiveConnection } from '../live/live-connection';
import { readPalette, TONE_SYMBOL } from '../live/tone-palette';
import { ago, siteTime, statusLook, utcTime, withUnit } from '../live/unit-status';
import { ColourScheme } from '../shell/colour-scheme';
import { CommandConfirm, type CommandConfirmData, type CommandConfirmResult } from './command-confirm';
import {
  CONFIGURE_CAUTION, commandChoices, commandParams, describeCommand, describeConfigure, describeRelease, HOLD_CAUTION, holderNames, isHeld,
  MOTION_CAUTION, ownHold, queuedNote, RELEASE_CAUTION, STATUS_LOOK, upsertCommand, type CommandChoice,
} from './commands';
import { HoldPanel } from './hold-panel';
import { appendLive, lastHourOptions, pointFromRow, type HourPoint } from './last-hour';
import { scanFindings, scanHeatmapOptions } from './scan-chart';
import { normalToDome, skyDomeOptions, type DomePoint } from './sky-dome';

/** One unit, live: values, last hour, where it points against the modelled sky, commands, alarms and history. */
@Component({
  selector: 'bw-unit-view',
  imports: [
    FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule, MatTooltipModule,
    RouterLink, NgxEchartsDirective, LinkBadge, AlarmCard, DecimalPipe, LowerCasePipe, HoldPanel,
  ],
  templateUrl: './unit-view.html',
  styleUrl: './unit-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitView {
  private readonly unitApi = inject(UnitApi);
  private readonly siteApi = inject(SiteApi);
  private readonly api = inject(FleetApi);
  private readonly alarmApi = inject(AlarmApi);
  protected readonly session = inject(Session);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);
  private readonly scheme = inject(ColourScheme);
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
  protected readonly alarms = signal<AlarmView[]>([]);
  protected readonly alarmsUnavailable = signal<string | null>(null);
  protected readonly sending = signal<string | null>(null);
  protected readonly now = signal(Date.now());
  protected readonly gotoTilt = signal<number | null>(null);
  protected readonly gotoAzimuth = signal<number | null>(null);
  protected readonly acking = signal<number | null>(null);
  /** Scan and relocate: the scan command sent from here, and the latest scan result. */
  protected readonly scanCommand = signal<CommandView | null>(null);
  protected readonly scan = signal<ScanResult | null>(null);
  protected readonly scanLoading = signal(false);
  protected readonly scanProblem = signal<string | null>(null);
  /** The holds in force (from `GET …/holds`, then from the live state); null while loading. */
  protected readonly holds = signal<HoldView[] | null>(null);
  protected readonly holdsProblem = signal<string | null>(null);
  /** New settings for `configure`; empty fields are left as they are on the unit. */
  protected readonly cfgDetectorTilt = signal<number | null>(null);
  protected readonly cfgGain = signal<number | null>(null);
  protected readonly cfgDeadband = signal<number | null>(null);
  protected readonly cfgReportInterval = signal<number | null>(null);

  protected readonly sortedAlarms = computed(() => sortAlarms(this.alarms()).slice(0, 20));
  protected readonly openAlarmCount = computed(() => this.alarms().filter((a) => a.state !== 'cleared').length);
  protected readonly canAcknowledge = computed(() => may(this.session.role(), 'acknowledgeAlarms'));
  /** The most urgent open trap alarm's finding: where the modelled best is and what is lost. */
  protected readonly trap = computed(() => {
    const a = sortAlarms(this.alarms().filter((x) => x.kind === 'trap' && x.state !== 'cleared'))[0];
    const f = a ? trapFinding(a) : null;
    return a && f ? { alarm: a, finding: f, look: severityLook(a.severity) } : null;
  });
  protected readonly scanChoice = computed(() => this.choices().find((c) => c.kind === 'scan')!);
  protected readonly gotoChoice = computed(() => this.choices().find((c) => c.kind === 'goto')!);
  protected readonly scanFacts = computed(() => {
    const s = this.scan();
    return s ? scanFindings(s) : null;
  });
  protected readonly scanOptions = computed(() => {
    void this.scheme.current();
    const s = this.scan();
    return s ? scanHeatmapOptions(s, readPalette()) : null;
  });

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
  protected readonly settings = computed<UnitConfig | null>(() => {
    const c: UnitConfig = {};
    const put = (k: keyof UnitConfig, v: number | null, min: number, max: number): boolean => {
      if (v === null || v === undefined || (v as unknown) === '') return true;
      if (!Number.isFinite(v) || v < min || v > max) return false;
      c[k] = v;
      return true;
    };
    const ok = put('detectorTiltDeg', this.cfgDetectorTilt(), 0.5, 45) && put('gain', this.cfgGain(), 0.001, 100)
      && put('deadbandWm2', this.cfgDeadband(), 0, 500) && put('reportIntervalS', this.cfgReportInterval(), 1, 3600);
    return ok && Object.keys(c).length ? c : null;
  });
  protected readonly canSeeTraces = computed(() => may(this.session.role(), 'readTraces'));
  protected readonly zone = computed(() => this.site()?.timeZone ?? 'UTC');
  protected readonly hourOptions = computed(() => {
    void this.scheme.current();
    return lastHourOptions(this.hour(), readPalette(), this.zone(), Math.max(this.now(), this.hour().at(-1)?.t ?? 0));
  });
  protected readonly domeOptions = computed(() => {
    void this.scheme.current();
    const p = readPalette();
    const pts: DomePoint[] = [];
    const l = this.landscape();
    if (l) {
      const others = l.localMaxima.filter((m) => m.tiltDeg !== l.globalMax.tiltDeg || m.azimuthDeg !== l.globalMax.azimuthDeg);
      for (const [i, m] of others.entries()) {
        pts.push({ name: i === 0 ? 'Lesser peak' : `Lesser peak ${i + 1}`, ...normalToDome(m.tiltDeg, m.azimuthDeg), symbol: 'diamond', size: 14, colour: p.caution, label: `${Math.round(m.wm2)} W/m² · basin ${Math.round(m.basinShare * 100)} %` });
      }
      const g = l.localMaxima.find((m) => m.tiltDeg === l.globalMax.tiltDeg && m.azimuthDeg === l.globalMax.azimuthDeg);
      pts.push({ name: 'Modelled best', ...normalToDome(l.globalMax.tiltDeg, l.globalMax.azimuthDeg), symbol: 'pin', size: 24, colour: p.good, label: `best ${Math.round(l.globalMax.wm2)} W/m²${g ? ` · basin ${Math.round(g.basinShare * 100)} %` : ''}` });
      if (l.sun) pts.push({ name: 'Sun', azimuthDeg: l.sun.azimuthDeg, elevationDeg: l.sun.elevationDeg, symbol: 'circle', size: 20, colour: p.accent, label: 'sun' });
    }
    const s = this.state();
    if (s?.tiltDeg !== null && s?.tiltDeg !== undefined && s.azimuthDeg !== null) {
      pts.push({ name: 'Panel points here', ...normalToDome(s.tiltDeg, s.azimuthDeg), symbol: TONE_SYMBOL[this.look().tone] === 'emptyCircle' ? 'emptyCircle' : 'triangle', size: 18, colour: p.primary, label: s.serial });
    }
    return skyDomeOptions({ points: pts }, p);
  });

  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly ago = ago;
  protected readonly withUnit = withUnit;
  protected readonly statusLabel = STATUS_LOOK;
  protected readonly commandParams = commandParams;
  protected readonly alarmKindLabel = alarmKindLabel;
  protected readonly canSendCommands = computed(() => may(this.session.role(), 'commandMotion'));
  protected readonly queuedNote = queuedNote;
  protected readonly holderNames = holderNames;

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
      } else if (msg.type === 'alarm') {
        const a = toAlarmView(msg.alarm);
        if (a && a.unitId === u.id) this.alarms.set(upsertAlarm(this.alarms(), a));
      }
    });
    interval(5000).pipe(takeUntilDestroyed()).subscribe(() => this.now.set(Date.now()));
    interval(300_000).pipe(takeUntilDestroyed()).subscribe(() => this.loadLandscape());
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
        this.api.state(unit.id).subscribe({ next: (s) => s && this.state.set(s), error: () => undefined });
        this.loadHour(unit.id);
        this.loadLandscape();
        this.loadCommands();
        this.loadHolds();
        this.alarmApi.list({ unitId: unit.id }).subscribe((r) => {
          if (r.available) this.alarms.set(r.alarms);
          else this.alarmsUnavailable.set(r.reason);
        });
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
    this.api.telemetry(unitId, new Date(to.getTime() - 3_660_000), to).subscribe({
      next: (rows) => {
        const merged = [...rows.map(pointFromRow), ...this.hour()].sort((a, b) => a.t - b.t).filter((p, i, a) => i === 0 || p.t !== a[i - 1]!.t);
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
    this.api.landscape(u.siteId, new Date(), u.detectorTiltDeg, false, 3).subscribe({
      next: (l) => {
        this.landscape.set(l);
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
    this.api.commands(u.id).subscribe({
      next: (list) => this.commands.set(list.reduce((acc, c) => upsertCommand(acc, c), [] as CommandView[])),
      error: (e: unknown) => this.commandsProblem.set(toApiProblem(e).message),
    });
  }

  protected loadHolds(): void {
    const u = this.unit();
    if (!u) return;
    this.holdsProblem.set(null);
    this.api.holds(u.id).subscribe({
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
        this.scanProblem.set(p.status === 404 ? (commandId ? 'The unit has not reported samples for this scan yet.' : 'This unit has no scan yet. Send one first.') : `The scan could not be loaded. ${p.message}`);
      },
    });
  }

  protected acknowledge(a: AlarmView): void {
    this.acking.set(a.id);
    this.alarmApi.acknowledge(a.id).subscribe({
      next: (v) => {
        this.acking.set(null);
        this.alarms.set(upsertAlarm(this.alarms(), v));
        this.notify.done(`Acknowledged: ${alarmKindLabel(v.kind)}.`);
      },
      error: (e: unknown) => {
        this.acking.set(null);
        this.notify.problem(`The alarm was not acknowledged. ${toApiProblem(e).message}`);
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
          ? { text: { label: 'Note (optional)', hint: 'What the work is. Everyone who sees the unit reads it.', required: false, maxLength: HOLD_TEXT_MAX } }
          : {}),
      },
      (r) => ({ kind: choice.kind, ...target, ...(choice.motion ? { confirm: true } : {}), ...(choice.kind === 'hold' && r.text ? { note: r.text } : {}) }),
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
        ...(own ? {} : { text: { label: 'Reason (required)', hint: `Why you release a hold that is not yours. ${hold.holder.name} and the audit log see it.`, required: true, maxLength: HOLD_TEXT_MAX } }),
      },
      (r) => ({ kind: 'release-hold', confirm: true, ...(own ? {} : { holdId: hold.id, reason: r.text }) }),
      label,
    );
  }

  /** Sends the settings in the form through the confirmation. */
  protected sendSettings(): void {
    const u = this.unit();
    const config = this.settings();
    if (!u || !config) return;
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

  private confirmThen(d: Omit<CommandConfirmData, 'serial' | 'siteName'>, request: (r: CommandConfirmResult) => IssueCommandRequest, label: string): void {
    const u = this.unit();
    if (!u) return;
    const data: CommandConfirmData = { serial: u.serial, siteName: this.site()?.name ?? u.siteName, ...d };
    this.dialog
      .open<CommandConfirm, CommandConfirmData, CommandConfirmResult>(CommandConfirm, { data, width: '560px', maxWidth: '95vw', autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((r) => {
        if (!r) return;
        const req = request(r);
        this.sending.set(req.kind);
        this.api.issue(u.id, req).subscribe({
          next: (c) => {
            this.sending.set(null);
            this.commands.set(upsertCommand(this.commands(), c));
            if (c.kind === 'scan') {
              this.scanCommand.set(c);
              this.scanProblem.set(null);
            }
            if (c.kind === 'hold' || c.kind === 'release-hold') this.loadHolds();
            const waiting = queuedNote(c, this.zone());
            this.notify.done(waiting ? `${label} for ${u.serial}. ${waiting}` : c.status === 'completed' && !c.sentAt ? `${label}: done. ${c.reason ?? ''}` : `${label}: sent to ${u.serial}.`);
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
