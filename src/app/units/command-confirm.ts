import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';

export interface CommandConfirmData {
  serial: string;
  siteName: string;
  title: string;
  /** What will happen, naming the unit and the motion. */
  description: string;
  caution: string;
  motion: boolean;
  confirmLabel: string;
  confirmIcon: string;
}

/**
 * Confirmation of a command: names the unit, its site and the motion, shows the cautions, and for motion asks the
 * sender to state that nobody is within reach before the button is enabled. Closes with `true` when confirmed.
 */
@Component({
  selector: 'bw-command-confirm',
  imports: [MatButtonModule, MatCheckboxModule, MatDialogModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p class="target"><mat-icon aria-hidden="true">solar_power</mat-icon><strong>{{ data.serial }}</strong> at {{ data.siteName }}</p>
      <p data-testid="command-description">{{ data.description }}</p>
      <div class="notice caution" role="note" data-testid="command-caution">
        <mat-icon aria-hidden="true">warning</mat-icon>
        <p>{{ data.caution }}</p>
      </div>
      @if (data.motion) {
        <mat-checkbox [checked]="clear()" (change)="clear.set($event.checked)" data-testid="people-clear">
          I have made sure nobody is within reach of {{ data.serial }}.
        </mat-checkbox>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="false" cdkFocusInitial>Cancel</button>
      <button mat-flat-button type="button" [mat-dialog-close]="true" [disabled]="data.motion && !clear()" data-testid="confirm">
        <mat-icon>{{ data.confirmIcon }}</mat-icon>{{ data.confirmLabel }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .target { display: flex; align-items: center; gap: 8px; font: var(--mat-sys-title-medium); }
    mat-checkbox { display: block; margin-top: 8px; }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CommandConfirm {
  protected readonly data = inject<CommandConfirmData>(MAT_DIALOG_DATA);
  protected readonly clear = signal(false);
}
