import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { User } from '../../../../shared/contracts/api';
import { applyServerErrors } from '../../ui/api-error';
import { errorText, MAX_PASSWORD_BYTES, maxUtf8Bytes, MIN_PASSWORD_LENGTH } from '../../ui/validation';
import { UserApi } from '../../core/user-api';

/** Sets a new password for someone; closes with `true` once the server has taken it. */
@Component({
  selector: 'bw-password-form',
  imports: [ReactiveFormsModule, MatButtonModule, MatDialogModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  template: `
    <h2 mat-dialog-title>New password for {{ user.name }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        @if (saving()) {
          <mat-progress-bar mode="indeterminate" aria-label="Saving" />
        }
        @if (problem(); as message) {
          <div class="notice problem" role="alert">
            <mat-icon aria-hidden="true">error</mat-icon>
            <p>{{ message }}</p>
          </div>
        }
        <p>The old password stops working at once. Pass the new one on privately.</p>
        <mat-form-field class="full">
          <mat-label>New password</mat-label>
          <input matInput [type]="show() ? 'text' : 'password'" formControlName="password" autocomplete="new-password" required />
          <button
            mat-icon-button
            matSuffix
            type="button"
            (click)="show.set(!show())"
            [attr.aria-label]="show() ? 'Hide password' : 'Show password'"
          >
            <mat-icon>{{ show() ? 'visibility_off' : 'visibility' }}</mat-icon>
          </button>
          <mat-hint>At least {{ min }} characters</mat-hint>
          <mat-error>{{ errorText(form.controls.password.errors, 'Password') }}</mat-error>
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()"><mat-icon>key</mat-icon>Set password</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .full {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PasswordForm {
  private readonly api = inject(UserApi);
  private readonly dialog = inject<MatDialogRef<PasswordForm, boolean>>(MatDialogRef);
  protected readonly user = inject<User>(MAT_DIALOG_DATA);
  protected readonly errorText = errorText;
  protected readonly min = MIN_PASSWORD_LENGTH;
  protected readonly form = new FormGroup({
    password: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH), maxUtf8Bytes(MAX_PASSWORD_BYTES)],
    }),
  });
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly show = signal(false);

  protected save(): void {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.saving.set(true);
    this.api.setPassword(this.user.id, this.form.controls.password.value).subscribe({
      next: () => this.dialog.close(true),
      error: (error: unknown) => {
        this.saving.set(false);
        this.problem.set(applyServerErrors(this.form, error));
      },
    });
  }
}
