import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import type { CommandView } from '../../../shared/contracts/live';
import { siteTime, utcTime } from '../live/unit-status';
import { commandText, queuedNote, STATUS_LOOK } from './commands';

/** The commands sent to a unit, newest first, with their outcome and what a queued one waits for. */
@Component({
  selector: 'bw-command-history',
  imports: [MatIconModule, MatTooltipModule],
  template: `
    <section class="panel" aria-labelledby="history-title">
      <h2 id="history-title">Command history</h2>
      @if (problem(); as message) {
        <div class="notice problem" role="alert">
          <mat-icon aria-hidden="true">error</mat-icon>
          <p>{{ message }}</p>
        </div>
      }
      <div class="table-frame">
        <table class="history" aria-label="Commands sent to this unit, newest first" data-testid="command-history">
          <thead>
            <tr>
              <th scope="col">Issued</th>
              <th scope="col">Command</th>
              <th scope="col">By</th>
              <th scope="col">Outcome</th>
            </tr>
          </thead>
          <tbody>
            @for (c of commands(); track c.id) {
              <tr>
                <td [matTooltip]="utcTime(c.issuedAt)">{{ siteTime(c.issuedAt, timeZone(), true) }}</td>
                <td>{{ commandText(c) }}</td>
                <td>{{ c.issuedBy.name }}</td>
                <td>
                  <span class="outcome"
                    ><mat-icon aria-hidden="true">{{ statusLabel[c.status].icon }}</mat-icon
                    >{{ statusLabel[c.status].label }}</span
                  >
                  @if (c.reason) {
                    <span class="quiet"> — {{ c.reason }}</span>
                  }
                  @if (queuedNote(c, timeZone()); as note) {
                    <span class="queued" data-testid="queued-note">{{ note }}</span>
                  }
                </td>
              </tr>
            } @empty {
              <tr>
                <td colspan="4" class="no-data">No commands sent to this unit yet.</td>
              </tr>
            }
          </tbody>
        </table>
      </div>
    </section>
  `,
  styleUrl: './unit-panel.scss',
  styles: `
    .history {
      width: 100%;
      border-collapse: collapse;
      th,
      td {
        text-align: left;
        padding: 8px 12px;
        border-bottom: 1px solid var(--mat-sys-outline-variant);
        font: var(--mat-sys-body-medium);
      }
      th {
        font: var(--mat-sys-label-large);
      }
    }
    .outcome {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      mat-icon {
        font-size: 18px;
        width: 18px;
        height: 18px;
      }
    }
    .queued {
      display: block;
      font: var(--mat-sys-body-small);
      color: var(--bw-caution);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CommandHistory {
  /** Newest first. */
  readonly commands = input.required<CommandView[]>();
  readonly problem = input<string | null>(null);
  readonly timeZone = input('UTC');

  protected readonly siteTime = siteTime;
  protected readonly utcTime = utcTime;
  protected readonly statusLabel = STATUS_LOOK;
  protected readonly commandText = commandText;
  protected readonly queuedNote = queuedNote;
}
