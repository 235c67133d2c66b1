import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';

export interface CommandConfirmData {
  serial: string;
  siteName: string;
  title: string;
  /** What will happen, naming the unit and the motion. */
  description: string;
  caution: string;
  /** Whether the sender must state that nobody is within reach (motion, release of a hold, new settings). */
  askClear: boolean;
  confirmLabel: string;
  confirmIcon: string;
  /** A text the sender writes: the note of a hold (optional) or the reason for releasing someone else's hold (required). */
  text?: { label: string; hint: string; required: boolean; maxLength: number };
}

/** What the dialog closes with when confirmed; `undefined` when cancelled. */
export interface CommandConfirmResult {
  /** The written text, trimmed; empty when none was asked for or none given. */
  text: string;
}

/**
 * Confirmation of a command: names the unit, its site and the motion, shows the cautions, asks the sender to state that
 * nobody is within reach before the button is enabled when the unit may move, and takes a note or a reason when asked.
 */
@Component({
  selector: 'bw-command-confirm',
  imports: [MatButtonModule, MatCheckboxModule, MatDialogModule, MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p class="target">
        <mat-icon aria-hidden="true">solar_power</mat-icon><strong>{{ data.serial }}</strong> at {{ data.siteName }}
      </p>
      <p data-testid="command-description">{{ data.description }}</p>
      <div class="notice caution" role="note" data-testid="command-caution">
        <mat-icon aria-hidden="true">warning</mat-icon>
        <p>{{ data.caution }}</p>
      </div>
      @if (data.text; as t) {
        <mat-form-field class="text" subscriptSizing="dynamic">
          <mat-label>{{ t.label }}</mat-label>
          <textarea
            matInput
            rows="2"
            [attr.maxlength]="t.maxLength"
            [required]="t.required"
            [value]="text()"
            (input)="text.set($any($event.target).value)"
            data-testid="command-text"
          ></textarea>
          <mat-hint>{{ t.hint }}</mat-hint>
        </mat-form-field>
      }
      @if (data.askClear) {
        <mat-checkbox [checked]="clear()" (change)="clear.set($event.checked)" data-testid="people-clear">
          I have made sure nobody is within reach of {{ data.serial }}.
        </mat-checkbox>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="undefined" cdkFocusInitial>Cancel</button>
      <button mat-flat-button type="button" (click)="confirm()" [disabled]="!ready()" data-testid="confirm">
        <mat-icon>{{ data.confirmIcon }}</mat-icon>{{ data.confirmLabel }}
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .target {
      display: flex;
      align-items: center;
      gap: 8px;
      font: var(--mat-sys-title-medium);
    }
    mat-checkbox {
      display: block;
      margin-top: 8px;
    }
    .text {
      display: block;
      width: 100%;
      margin-top: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CommandConfirm {
  protected readonly data = inject<CommandConfirmData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<CommandConfirm, CommandConfirmResult>>(MatDialogRef);
  protected readonly clear = signal(false);
  protected readonly text = signal('');
  protected readonly ready = computed(
    () => (!this.data.askClear || this.clear()) && (!this.data.text?.required || this.text().trim().length > 0),
  );

  protected confirm(): void {
    if (this.ready()) this.ref.close({ text: this.text().trim() });
  }
}
