import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { ROLES, type Owner, type Role, type User } from '../../../../shared/contracts/api';
import { ROLE_LABELS } from '../../auth/roles';
import { applyServerErrors } from '../../ui/api-error';
import { errorText, MAX_PASSWORD_BYTES, maxUtf8Bytes, MIN_PASSWORD_LENGTH } from '../../ui/validation';
import { UserApi } from '../../core/user-api';

export interface UserFormData {
  /** The person to edit, or null to add one. */
  user: User | null;
  owners: Owner[];
}

/** Add a person (with a first password) or change their name, role and owner. */
@Component({
  selector: 'bw-user-form',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
  ],
  templateUrl: './user-form.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UserForm {
  private readonly api = inject(UserApi);
  private readonly dialog = inject<MatDialogRef<UserForm, User>>(MatDialogRef);
  protected readonly data = inject<UserFormData>(MAT_DIALOG_DATA);
  protected readonly errorText = errorText;
  protected readonly roles = ROLES.map((role) => ({ role, ...ROLE_LABELS[role] }));
  protected readonly minPassword = MIN_PASSWORD_LENGTH;

  protected readonly form = new FormGroup({
    email: new FormControl(this.data.user?.email ?? '', {
      nonNullable: true,
      validators: [Validators.required, Validators.email],
    }),
    name: new FormControl(this.data.user?.name ?? '', {
      nonNullable: true,
      validators: [Validators.required, Validators.maxLength(120)],
    }),
    role: new FormControl<Role>(this.data.user?.role ?? 'technician', { nonNullable: true }),
    ownerId: new FormControl<number | null>(this.data.user?.ownerId ?? null),
    password: new FormControl('', {
      nonNullable: true,
      validators: this.data.user ? [] : [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH), maxUtf8Bytes(MAX_PASSWORD_BYTES)],
    }),
  });
  protected readonly role = toSignal(this.form.controls.role.valueChanges, { initialValue: this.form.controls.role.value });
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly showPassword = signal(false);

  constructor() {
    if (this.data.user) this.form.controls.email.disable();
    this.requireOwnerFor(this.form.controls.role.value);
    this.form.controls.role.valueChanges.pipe(takeUntilDestroyed(inject(DestroyRef))).subscribe((role) => this.requireOwnerFor(role));
  }

  /** Owner accounts must belong to an owner; other roles never do. */
  private requireOwnerFor(role: Role): void {
    const ownerId = this.form.controls.ownerId;
    if (role === 'owner') {
      ownerId.setValidators(Validators.required);
    } else {
      ownerId.clearValidators();
      ownerId.setValue(null, { emitEvent: false });
    }
    ownerId.updateValueAndValidity({ emitEvent: false });
  }

  protected save(): void {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const value = this.form.getRawValue();
    const ownerId = value.role === 'owner' ? value.ownerId : null;
    this.saving.set(true);
    const request = this.data.user
      ? this.api.update(this.data.user.id, { name: value.name.trim(), role: value.role, ownerId })
      : this.api.create({ email: value.email.trim(), name: value.name.trim(), role: value.role, ownerId, password: value.password });
    request.subscribe({
      next: (user) => this.dialog.close(user),
      error: (error: unknown) => {
        this.saving.set(false);
        this.problem.set(applyServerErrors(this.form, error));
      },
    });
  }
}
