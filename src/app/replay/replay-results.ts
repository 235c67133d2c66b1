import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { AlarmView, DetectorRunResult } from '../../../shared/contracts/alarms';
import { alarmKindWords } from '../../../shared/contracts/plain-words';
import { severityLook } from '../live/alarm-look';
import { siteTime, utcTime } from '../live/unit-status';

/** One unit (or the site) and alarm kind: what the run raised beside what is stored. */
export interface ReplayRow {
  key: string;
  /** The unit's serial, or null for a site-wide alarm. */
  serial: string | null;
  kind: string;
  run: AlarmView[];
  stored: AlarmView[];
  /** `both`: the run and the store agree there was such an alarm; otherwise only one of them has it. */
  verdict: 'both' | 'run-only' | 'stored-only';
}

/** Pairs the run's alarms with the stored ones by unit and kind, units in serial order, site-wide last. */
export function replayRows(result: Pick<DetectorRunResult, 'alarms' | 'stored'>): ReplayRow[] {
  const rows = new Map<string, ReplayRow>();
  const add = (a: AlarmView, side: 'run' | 'stored') => {
    const key = `${a.serial ?? `site ${a.siteId}`}|${a.kind}`;
    let row = rows.get(key);
    if (!row) {
      row = { key, serial: a.serial, kind: a.kind, run: [], stored: [], verdict: 'both' };
      rows.set(key, row);
    }
    row[side].push(a);
  };
  for (const a of result.alarms) add(a, 'run');
  for (const a of result.stored) add(a, 'stored');
  return [...rows.values()]
    .map((r) => ({ ...r, verdict: r.run.length && r.stored.length ? 'both' : r.run.length ? 'run-only' : 'stored-only' }) as ReplayRow)
    .sort((a, b) => (a.serial ?? '\uffff').localeCompare(b.serial ?? '\uffff') || a.kind.localeCompare(b.kind));
}

const VERDICT = {
  both: { label: 'Both', icon: 'check_circle', hint: 'The run raises it and it is stored.' },
  'run-only': { label: 'Only the run', icon: 'add_circle', hint: 'The detectors as they are now would raise it; nothing is stored.' },
  'stored-only': { label: 'Only stored', icon: 'remove_circle', hint: 'Stored, but the detectors as they are now would not raise it.' },
} as const;

/** The run's alarms beside the stored ones, per unit and kind, with a count of where they differ. */
@Component({
  selector: 'bw-replay-results',
  imports: [MatIconModule, MatTooltipModule],
  template: `
    <section class="panel" aria-labelledby="results-title">
      <h2 id="results-title">What the detectors would raise</h2>
      <p data-testid="replay-counts">
        {{ result().reports }} report{{ result().reports === 1 ? '' : 's' }} of {{ result().units }} unit{{
          result().units === 1 ? '' : 's'
        }}: the run raises {{ result().alarms.length }} alarm{{ result().alarms.length === 1 ? '' : 's' }}; {{ result().stored.length }}
        {{ result().stored.length === 1 ? 'is' : 'are' }} stored for the same units and range.
      </p>
      @if (!rows().length) {
        <div class="empty-state small" data-testid="replay-none">
          <mat-icon aria-hidden="true">task_alt</mat-icon>
          <p>
            Neither the run nor the store has an alarm for these units in this range{{
              result().reports ? '' : ' (no reports are stored for it)'
            }}.
          </p>
        </div>
      } @else {
        <p class="quiet" data-testid="replay-verdicts">
          {{ verdicts().both }} in both · {{ verdicts()['run-only'] }} only in the run · {{ verdicts()['stored-only'] }} only stored
        </p>
        <div class="table-frame">
          <table class="rows">
            <thead>
              <tr>
                <th scope="col">Unit</th>
                <th scope="col">Alarm</th>
                <th scope="col">The run</th>
                <th scope="col">Stored</th>
                <th scope="col">Agree?</th>
              </tr>
            </thead>
            <tbody>
              @for (r of rows(); track r.key) {
                <tr [attr.data-testid]="'replay-row-' + (r.serial ?? 'site') + '-' + r.kind">
                  <td>{{ r.serial ?? 'Whole site' }}</td>
                  <td>{{ kindWords(r.kind) }}</td>
                  <td>
                    @for (a of r.run; track a.id) {
                      <span class="alarm">
                        <span class="sev" [class]="sev(a).cssClass"
                          ><mat-icon aria-hidden="true">{{ sev(a).icon }}</mat-icon
                          >{{ a.severity }}</span
                        >
                        <span [matTooltip]="utcTime(a.raisedAt)">from {{ siteTime(a.raisedAt, timeZone()) }}</span>
                      </span>
                    } @empty {
                      <span class="quiet">none</span>
                    }
                  </td>
                  <td>
                    @for (a of r.stored; track a.id) {
                      <span class="alarm">
                        <span class="sev" [class]="sev(a).cssClass"
                          ><mat-icon aria-hidden="true">{{ sev(a).icon }}</mat-icon
                          >{{ a.severity }}</span
                        >
                        <span [matTooltip]="utcTime(a.raisedAt)"
                          >from {{ siteTime(a.raisedAt, timeZone())
                          }}{{ a.clearedAt ? ' to ' + siteTime(a.clearedAt, timeZone()) : ', open' }}</span
                        >
                      </span>
                    } @empty {
                      <span class="quiet">none</span>
                    }
                  </td>
                  <td>
                    <span
                      class="state"
                      [matTooltip]="verdictLook(r).hint"
                      [attr.data-testid]="'verdict-' + (r.serial ?? 'site') + '-' + r.kind"
                    >
                      <mat-icon aria-hidden="true">{{ verdictLook(r).icon }}</mat-icon>{{ verdictLook(r).label }}
                    </span>
                  </td>
                </tr>
              }
            </tbody>
          </table>
        </div>
      }
    </section>
  `,
  styleUrl: '../units/unit-panel.scss',
  styles: `
    table.rows {
      border-collapse: collapse;
      width: 100%;
      th,
      td {
        text-align: left;
        vertical-align: top;
        padding: 6px 12px;
        border-top: 1px solid var(--mat-sys-outline-variant);
      }
    }
    .alarm {
      display: flex;
      flex-wrap: wrap;
      gap: 4px 8px;
      align-items: center;
    }
    .sev {
      display: inline-flex;
      align-items: center;
      gap: 2px;
      mat-icon {
        font-size: 16px;
        width: 16px;
        height: 16px;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReplayResults {
  readonly result = input.required<DetectorRunResult>();
  readonly timeZone = input('UTC');

  protected readonly rows = computed(() => replayRows(this.result()));
  protected readonly verdicts = computed(() => {
    const out = { both: 0, 'run-only': 0, 'stored-only': 0 };
    for (const r of this.rows()) out[r.verdict]++;
    return out;
  });
  protected readonly kindWords = alarmKindWords;
  protected readonly sev = (a: AlarmView) => severityLook(a.severity);
  protected readonly verdictLook = (r: ReplayRow) => VERDICT[r.verdict];
  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
}
