import { Clipboard } from '@angular/cdk/clipboard';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';

export interface DeviceSecretData {
  serial: string;
  deviceSecret: string;
  /** Whether the secret replaces an earlier one. */
  rotated: boolean;
}

/** Shows a unit's MQTT device secret the one time the server hands it out. */
@Component({
  selector: 'bw-device-secret',
  imports: [MatButtonModule, MatCheckboxModule, MatDialogModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Device secret for {{ data.serial }}</h2>
    <mat-dialog-content>
      <div class="notice caution" role="note">
        <mat-icon aria-hidden="true">warning</mat-icon>
        <p>
          Copy this secret into the unit’s controller now. It will not be shown again: Brightward keeps only a hash of it.
          @if (data.rotated) {
            The previous secret no longer works, so the unit stays offline until it has the new one.
          }
        </p>
      </div>
      <p class="label" id="secret-label">Device secret (MQTT password for user {{ data.serial }})</p>
      <div class="secret">
        <code aria-labelledby="secret-label" data-testid="device-secret">{{ data.deviceSecret }}</code>
        <button mat-stroked-button type="button" (click)="copy()" data-testid="copy-secret">
          <mat-icon>{{ copied() ? 'check' : 'content_copy' }}</mat-icon>{{ copied() ? 'Copied' : 'Copy' }}
        </button>
      </div>
      <span class="visually-hidden" aria-live="polite">{{ copied() ? 'Secret copied to the clipboard' : '' }}</span>
      <mat-checkbox [checked]="stored()" (change)="stored.set($event.checked)">I have stored the secret safely</mat-checkbox>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-flat-button type="button" [mat-dialog-close]="true" [disabled]="!stored()"><mat-icon>done</mat-icon>Done</button>
    </mat-dialog-actions>
  `,
  styles: `
    .label {
      font: var(--mat-sys-label-large);
      margin: 16px 0 6px;
    }
    .secret {
      display: flex;
      gap: 12px;
      align-items: center;
      flex-wrap: wrap;
      margin-bottom: 12px;
    }
    code {
      flex: 1 1 240px;
      padding: 10px 12px;
      border-radius: 8px;
      background: var(--mat-sys-surface-container-highest);
      font:
        500 15px/1.4 ui-monospace,
        'DejaVu Sans Mono',
        monospace;
      word-break: break-all;
      user-select: all;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeviceSecret {
  private readonly clipboard = inject(Clipboard);
  protected readonly data = inject<DeviceSecretData>(MAT_DIALOG_DATA);
  protected readonly copied = signal(false);
  protected readonly stored = signal(false);

  protected copy(): void {
    this.copied.set(this.clipboard.copy(this.data.deviceSecret));
  }
}
