import { ChangeDetectionStrategy, Component, inject, signal, viewChild } from '@angular/core';
import { FormControl, FormGroup, FormGroupDirective, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { applyServerErrors, toApiProblem } from '../ui/api-error';
import { errorText, matches, MAX_PASSWORD_BYTES, maxUtf8Bytes, MIN_PASSWORD_LENGTH } from '../ui/validation';
import { Session } from './session';

/** Any signed-in person changes their own password; their other devices are signed out. */
@Component({
  selector: 'bw-change-password',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  templateUrl: './change-password.html',
  styleUrl: './change-password.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ChangePassword {
  private readonly session = inject(Session);
  protected readonly me = this.session.me;
  protected readonly errorText = errorText;
  protected readonly min = MIN_PASSWORD_LENGTH;
  protected readonly maxBytes = MAX_PASSWORD_BYTES;

  protected readonly form = new FormGroup({
    currentPassword: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
    newPassword: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH), maxUtf8Bytes(MAX_PASSWORD_BYTES)],
    }),
    repeatPassword: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, matches('newPassword')],
    }),
  });
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly done = signal(false);
  protected readonly show = signal(false);
  private readonly formDirective = viewChild.required(FormGroupDirective);

  constructor() {
    // Typing a new password again re-checks the repeat field.
    this.form.controls.newPassword.valueChanges.subscribe(() =>
      this.form.controls.repeatPassword.updateValueAndValidity({ emitEvent: false }),
    );
  }

  protected save(): void {
    if (this.saving()) return;
    this.problem.set(null);
    this.done.set(false);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.saving.set(true);
    const { currentPassword, newPassword } = this.form.getRawValue();
    this.session.changePassword({ currentPassword, newPassword }).subscribe({
      next: () => {
        this.saving.set(false);
        this.done.set(true);
        // Also forgets that the form was submitted, so the emptied fields show no "required" messages.
        this.formDirective().resetForm();
      },
      error: (error: unknown) => {
        this.saving.set(false);
        const problem = toApiProblem(error);
        this.problem.set(
          problem.code === 'too_many_attempts'
            ? 'Too many wrong current passwords. Wait a minute, then try again.'
            : applyServerErrors(this.form, error),
        );
      },
    });
  }
}
