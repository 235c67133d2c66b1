import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { Owner, OwnerInput } from '../../../../shared/contracts/api';
import { applyServerErrors } from '../../ui/api-error';
import { errorText } from '../../ui/validation';
import { OwnerApi } from '../../core/owner-api';

/** Add or edit an owner; closes with the saved owner. */
@Component({
  selector: 'bw-owner-form',
  imports: [ReactiveFormsModule, MatButtonModule, MatDialogModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  template: `
    <h2 mat-dialog-title>{{ owner ? 'Edit owner' : 'Add an owner' }}</h2>
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
        <div class="form-grid">
          <mat-form-field class="wide">
            <mat-label>Name</mat-label>
            <input matInput formControlName="name" required />
            <mat-hint>The organisation that owns the sites</mat-hint>
            <mat-error>{{ errorText(form.controls.name.errors, 'Name') }}</mat-error>
          </mat-form-field>
          <mat-form-field class="wide">
            <mat-label>Contact email (optional)</mat-label>
            <input matInput type="email" formControlName="contactEmail" />
            <mat-hint>Where yield statements are sent</mat-hint>
            <mat-error>{{ errorText(form.controls.contactEmail.errors, 'Contact email') }}</mat-error>
          </mat-form-field>
        </div>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">
          <mat-icon>save</mat-icon>{{ owner ? 'Save changes' : 'Add owner' }}
        </button>
      </mat-dialog-actions>
    </form>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OwnerForm {
  private readonly api = inject(OwnerApi);
  private readonly dialog = inject<MatDialogRef<OwnerForm, Owner>>(MatDialogRef);
  protected readonly owner = inject<Owner | null>(MAT_DIALOG_DATA);
  protected readonly errorText = errorText;

  protected readonly form = new FormGroup({
    name: new FormControl(this.owner?.name ?? '', {
      nonNullable: true,
      validators: [Validators.required, Validators.maxLength(120)],
    }),
    contactEmail: new FormControl(this.owner?.contactEmail ?? '', { nonNullable: true, validators: [Validators.email] }),
  });
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected save(): void {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const value = this.form.getRawValue();
    const input: OwnerInput = { name: value.name.trim(), contactEmail: value.contactEmail.trim() || null };
    this.saving.set(true);
    const request = this.owner ? this.api.update(this.owner.id, input) : this.api.create(input);
    request.subscribe({
      next: (owner) => this.dialog.close(owner),
      error: (error: unknown) => {
        this.saving.set(false);
        this.problem.set(applyServerErrors(this.form, error));
      },
    });
  }
}
