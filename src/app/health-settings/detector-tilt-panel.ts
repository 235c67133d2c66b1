import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import type { CommandStatus } from '../../../shared/contracts/live';
import type { ApplyDetectorTiltUnit, DetectorTiltRecommendation } from '../../../shared/contracts/detector-tilt';
import { STATUS_LOOK } from '../units/commands';

/** How one unit's command stands, in words and an icon. */
export function applyLook(u: Pick<ApplyDetectorTiltUnit, 'status'>): { label: string; icon: string } {
  if (u.status === 'refused') return { label: 'Refused before sending', icon: 'block' };
  if (u.status === 'skipped') return { label: 'Not sent (unit disabled)', icon: 'do_not_disturb_on' };
  return STATUS_LOOK[u.status as CommandStatus];
}

/** The answers so far: "2 done · 1 refused by the unit · 1 no answer · 2 waiting". */
export function applySummary(units: readonly Pick<ApplyDetectorTiltUnit, 'status'>[]): string {
  const count = (pred: (s: ApplyDetectorTiltUnit['status']) => boolean) => units.filter((u) => pred(u.status)).length;
  const parts: [number, string][] = [
    [count((s) => s === 'completed' || s === 'acknowledged'), 'accepted'],
    [count((s) => s === 'rejected'), 'refused by the unit'],
    [count((s) => s === 'timed-out'), 'no answer'],
    [count((s) => s === 'queued' || s === 'sent'), 'waiting for the unit'],
    [count((s) => s === 'refused' || s === 'cancelled'), 'not sent'],
    [count((s) => s === 'skipped'), 'disabled'],
  ];
  return parts
    .filter(([n]) => n > 0)
    .map(([n, what]) => `${n} ${what}`)
    .join(' · ');
}

/**
 * The detector tilt the site needs over the year (the worst day's smallest single-peak tilt plus a margin), and sending
 * it to every unit of the site, with each unit's answer as it comes.
 */
@Component({
  selector: 'bw-detector-tilt-panel',
  imports: [MatButtonModule, MatIconModule],
  template: `
    <section class="panel" aria-labelledby="tilt-title">
      <h2 id="tilt-title">Detector tilt for the site</h2>
      <p class="hint">
        A detector pair tilted further apart sees a smoother sky, so a unit climbs to the brightest orientation instead of settling on a
        reflection. Brightward works out the smallest tilt that leaves one peak on the worst day of the year and adds a margin.
      </p>
      @if (problem(); as p) {
        <div class="notice problem" role="alert" data-testid="tilt-problem">
          <mat-icon aria-hidden="true">error</mat-icon>
          <p>The recommendation could not be worked out. {{ p }}</p>
        </div>
      }
      @if (loading()) {
        <p class="quiet" role="status" data-testid="tilt-loading">
          <mat-icon aria-hidden="true">hourglass_top</mat-icon> Modelling twelve days of the year hour by hour; this takes a few seconds…
        </p>
      } @else if (!recommendation()) {
        <button mat-stroked-button type="button" (click)="compute.emit()" data-testid="tilt-compute">
          <mat-icon>calculate</mat-icon>Work out the recommended detector tilt
        </button>
      } @else {
        @let r = recommendation()!;
        @if (r.recommendedDetectorTiltDeg !== null) {
          <p class="answer" data-testid="tilt-recommended">
            <mat-icon aria-hidden="true">settings_input_antenna</mat-icon>
            Recommended detector tilt: <strong>{{ r.recommendedDetectorTiltDeg }}°</strong>
          </p>
          @if (r.worstDay; as w) {
            <p data-testid="tilt-why">
              The worst day, {{ w.date }}, needs {{ w.singlePeakDetectorTiltDeg ?? 0.5 }}° for one peak at every instant; plus the margin of
              {{ r.marginDeg }}°{{ r.capped ? ', cut to the ' + r.maxDetectorTiltDeg + '° units take' : '' }}.
            </p>
          }
          @if (steeperUnits(); as n) {
            <p class="quiet" data-testid="tilt-lower">
              {{ n }} unit{{ n === 1 ? ' is' : 's are' }} set up with a steeper tilt. One peak needs no more than this, and a smaller tilt
              sees the sky more finely; keep the steeper tilt where units track well.
            </p>
          }
        } @else if (r.worstDay) {
          <div class="notice caution" role="note" data-testid="tilt-none">
            <mat-icon aria-hidden="true">warning</mat-icon>
            <p>
              No detector tilt up to {{ r.maxDetectorTiltDeg }}° (the steepest units take) leaves one peak on {{ r.worstDay.date }} ({{
                r.worstDay.instantsWithoutSinglePeak
              }}
              of {{ r.worstDay.instants }} instants in enough light): a second bright spot, such as a facade's reflection, lies too far from
              the first for the detectors to merge them. Plan periodic scans so units find the brightest orientation.
            </p>
          </div>
        } @else {
          <p data-testid="tilt-dark">The site has no daylight on any of the days judged; nothing to recommend.</p>
        }
        <p class="quiet">{{ r.basis }}</p>
        <details>
          <summary>The days judged</summary>
          <table class="days">
            <thead>
              <tr>
                <th scope="col">Day</th>
                <th scope="col">Instants</th>
                <th scope="col">Most peaks</th>
                <th scope="col">One peak from</th>
              </tr>
            </thead>
            <tbody>
              @for (d of r.days; track d.date) {
                <tr [class.worst]="d.date === r.worstDay?.date">
                  <td>{{ d.date }}{{ d.date === r.worstDay?.date ? ' (worst)' : '' }}</td>
                  <td>{{ d.instants }}</td>
                  <td>{{ d.maxPeaks }}</td>
                  <td>
                    {{
                      d.instantsWithoutSinglePeak
                        ? 'none up to ' + r.maxDetectorTiltDeg + '°'
                        : d.singlePeakDetectorTiltDeg === null
                          ? 'dark'
                          : d.singlePeakDetectorTiltDeg + '°'
                    }}
                  </td>
                </tr>
              }
            </tbody>
          </table>
        </details>
        <h3>Units of the site</h3>
        <ul class="units" data-testid="tilt-units">
          @for (u of rows(); track u.id) {
            <li [attr.data-testid]="'tilt-unit-' + u.serial">
              <span class="serial">{{ u.serial }}</span>
              <span class="quiet">set up with {{ u.detectorTiltDeg }}°{{ u.disabled ? ' · disabled' : '' }}</span>
              @if (u.result; as res) {
                <span class="state" [attr.data-testid]="'tilt-status-' + u.serial">
                  <mat-icon aria-hidden="true">{{ look(res).icon }}</mat-icon>{{ look(res).label }}
                </span>
                @if (res.reason) {
                  <span class="quiet">{{ res.reason }}</span>
                }
              }
            </li>
          }
        </ul>
        @if (applied()?.length) {
          <p role="status" data-testid="tilt-summary"><strong>Answers so far:</strong> {{ summary() }}</p>
        }
        @if (canApply() && r.recommendedDetectorTiltDeg !== null) {
          <div class="actions">
            <button
              mat-flat-button
              type="button"
              [disabled]="applying() || !enabledUnits()"
              (click)="apply.emit(r.recommendedDetectorTiltDeg!)"
              data-testid="tilt-apply"
            >
              <mat-icon>send</mat-icon>Send {{ r.recommendedDetectorTiltDeg }}° to {{ enabledUnits() }} unit{{
                enabledUnits() === 1 ? '' : 's'
              }}
            </button>
            <span class="why"
              >One confirmed command per unit, each in the unit's history and the audit log; you will be asked to confirm.</span
            >
          </div>
        }
      }
    </section>
  `,
  styleUrl: '../units/unit-panel.scss',
  styles: `
    .answer {
      display: flex;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-title-medium);
    }
    h3 {
      font: var(--mat-sys-title-small);
      margin: 12px 0 4px;
    }
    .days {
      border-collapse: collapse;
      margin: 8px 0;
      th,
      td {
        text-align: left;
        padding: 2px 12px 2px 0;
      }
      .worst {
        font-weight: 600;
      }
    }
    .units {
      list-style: none;
      padding: 0;
      margin: 0;
      li {
        display: flex;
        flex-wrap: wrap;
        align-items: center;
        gap: 4px 12px;
        padding: 4px 0;
      }
      .serial {
        font-weight: 600;
        min-width: 90px;
      }
    }
    .actions {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 12px;
      margin-top: 12px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DetectorTiltPanel {
  readonly recommendation = input<DetectorTiltRecommendation | null>(null);
  readonly loading = input(false);
  readonly problem = input<string | null>(null);
  /** Whether the viewer may send the tilt to the site's units. */
  readonly canApply = input(false);
  readonly applying = input(false);
  /** Each unit's command after sending, kept up to date by the page. */
  readonly applied = input<ApplyDetectorTiltUnit[] | null>(null);

  readonly compute = output<void>();
  readonly apply = output<number>();

  protected readonly look = applyLook;
  protected readonly rows = computed(() => {
    const byUnit = new Map((this.applied() ?? []).map((u) => [u.unitId, u]));
    return (this.recommendation()?.units ?? []).map((u) => ({ ...u, result: byUnit.get(u.id) ?? null }));
  });
  /** Enabled units set up with a steeper tilt than the recommendation (sending it lowers theirs). */
  protected readonly steeperUnits = computed(() => {
    const r = this.recommendation();
    const rec = r?.recommendedDetectorTiltDeg;
    return rec === null || rec === undefined ? 0 : r!.units.filter((u) => !u.disabled && u.detectorTiltDeg > rec).length;
  });
  protected readonly enabledUnits = computed(() => (this.recommendation()?.units ?? []).filter((u) => !u.disabled).length);
  protected readonly summary = computed(() => applySummary(this.applied() ?? []));
}
