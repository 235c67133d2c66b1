import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { DecimalPipe } from '@angular/common';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { AlarmCard } from '../alarms/alarm-card';
import { AlarmApi, toAlarmView, type AlarmView } from '../core/alarm-api';
import { alarmKindLabel, severityLook, sortAlarms, trapFinding, upsertAlarm } from '../live/alarm-look';
import { LiveConnection } from '../live/live-connection';
import { toApiProblem } from '../ui/api-error';
import { Notify } from '../ui/notify';

/**
 * One unit's alarms, open and most urgent first, kept current from the live connection, with acknowledge; an open trap
 * alarm's finding (where the modelled best is and what is lost) leads, and can become the go-to target.
 */
@Component({
  selector: 'bw-unit-alarms-panel',
  imports: [DecimalPipe, MatButtonModule, MatIconModule, AlarmCard],
  template: `
    <section class="panel" aria-labelledby="alarms-title">
      <h2 id="alarms-title">
        Alarms <span class="quiet">({{ openCount() }} open)</span>
      </h2>
      @if (trap(); as t) {
        <div class="trap" role="note" data-testid="trap-finding">
          <mat-icon aria-hidden="true">landscape</mat-icon>
          <div>
            <!-- The full stops follow the blocks with no space: kept as written. -->
            <!-- prettier-ignore -->
            <p><strong>Stuck on a lesser peak.</strong>
              The modelled brightest orientation is tilt {{ t.finding.best.tiltDeg }}°, azimuth {{ t.finding.best.azimuthDeg }}° with {{ t.finding.best.wm2 | number: '1.0-0' }} W/m².
              @if (t.finding.lossWm2 !== null) {
                Where it points it loses <strong>{{ t.finding.lossWm2 | number: '1.0-0' }} W/m²</strong>@if (t.finding.lossPct !== null) { ({{ t.finding.lossPct | number: '1.0-1' }} %)}.
              }
              @if (t.finding.peaks !== null) { The model shows {{ t.finding.peaks }} peaks. }
              @if (t.finding.singlePeakDetectorTiltDeg !== null) { A detector tilt of {{ t.finding.singlePeakDetectorTiltDeg }}° or more would leave one. }
            </p>
            @if (canUseTarget()) {
              <button
                mat-button
                type="button"
                (click)="useTarget.emit({ tiltDeg: t.finding.best.tiltDeg, azimuthDeg: t.finding.best.azimuthDeg })"
                data-testid="use-trap-target"
              >
                <mat-icon>my_location</mat-icon>Use as go-to target
              </button>
            }
          </div>
        </div>
      }
      @if (unavailable(); as reason) {
        <div class="notice problem" role="alert" data-testid="unit-alarms-unavailable">
          <mat-icon aria-hidden="true">error</mat-icon>
          <p>{{ reason }}</p>
        </div>
      } @else if (alarms().length === 0) {
        <div class="empty-state small">
          <mat-icon aria-hidden="true">notifications_none</mat-icon>
          <p>No alarms for this unit.</p>
        </div>
      } @else {
        <ul class="alarm-list" aria-label="Alarms of this unit, open and most urgent first">
          @for (a of sorted(); track a.id) {
            <li>
              <bw-alarm-card
                [alarm]="a"
                [timeZone]="timeZone()"
                [showSubject]="false"
                [canAcknowledge]="canAcknowledge()"
                [busy]="acking() === a.id"
                [traceLinks]="traceLinks()"
                (acknowledge)="acknowledge($event)"
              />
            </li>
          }
        </ul>
      }
    </section>
  `,
  styleUrl: './unit-panel.scss',
  styles: `
    .alarm-list {
      list-style: none;
      padding: 0;
      margin: 0;
      display: grid;
      gap: 8px;
    }
    .trap {
      display: flex;
      gap: 12px;
      align-items: flex-start;
      padding: 12px 16px;
      margin-bottom: 12px;
      border-radius: 12px;
      background: var(--bw-caution-container);
      color: var(--bw-caution);
      p {
        margin: 0 0 4px;
      }
      mat-icon {
        flex: none;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitAlarmsPanel {
  private readonly alarmApi = inject(AlarmApi);
  private readonly live = inject(LiveConnection);
  private readonly notify = inject(Notify);

  readonly unitId = input.required<number>();
  /** IANA zone of the unit's site (alarm times are shown in it). */
  readonly timeZone = input('UTC');
  readonly canAcknowledge = input(false);
  /** Whether alarm cards link to the trace explorer. */
  readonly traceLinks = input(false);
  /** Whether the trap finding offers to become the go-to target (roles that may send commands). */
  readonly canUseTarget = input(false);

  /** The viewer wants the trap finding's modelled best as the go-to target. */
  readonly useTarget = output<{ tiltDeg: number; azimuthDeg: number }>();

  protected readonly alarms = signal<AlarmView[]>([]);
  protected readonly unavailable = signal<string | null>(null);
  protected readonly acking = signal<number | null>(null);

  protected readonly sorted = computed(() => sortAlarms(this.alarms()).slice(0, 20));
  protected readonly openCount = computed(() => this.alarms().filter((a) => a.state !== 'cleared').length);
  /** The most urgent open trap alarm's finding: where the modelled best is and what is lost. */
  protected readonly trap = computed(() => {
    const a = sortAlarms(this.alarms().filter((x) => x.kind === 'trap' && x.state !== 'cleared'))[0];
    const f = a ? trapFinding(a) : null;
    return a && f ? { alarm: a, finding: f, look: severityLook(a.severity) } : null;
  });

  constructor() {
    effect(() => {
      const unitId = this.unitId();
      untracked(() => this.load(unitId));
    });
    this.live.messages.pipe(takeUntilDestroyed()).subscribe((msg) => {
      if (msg.type !== 'alarm') return;
      const a = toAlarmView(msg.alarm);
      if (a && a.unitId === this.unitId()) this.alarms.set(upsertAlarm(this.alarms(), a));
    });
  }

  private load(unitId: number): void {
    this.alarmApi.list({ unitId }).subscribe((r) => {
      if (r.available) this.alarms.set(r.alarms);
      else this.unavailable.set(r.reason);
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
}
