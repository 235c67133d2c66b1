import { ChangeDetectionStrategy, Component, computed, effect, inject, OnInit, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import type { Owner, User } from '../../../../shared/contracts/api';
import { ROLE_LABELS } from '../../auth/roles';
import { Session } from '../../auth/session';
import { ConfirmDialog, ConfirmDialogData } from '../../ui/confirm-dialog';
import { toApiProblem } from '../../ui/api-error';
import { Notify } from '../../ui/notify';
import { TableData } from '../../ui/table-data';
import { OwnerApi } from '../../core/owner-api';
import { UserApi } from '../../core/user-api';
import { DemoHistoryLine } from '../demo-history-line';
import { PasswordForm } from './password-form';
import { UserForm, UserFormData } from './user-form';

@Component({
  selector: 'bw-people-page',
  imports: [
    DemoHistoryLine,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatMenuModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSortModule,
    MatTableModule,
  ],
  templateUrl: './people-page.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeoplePage implements OnInit {
  private readonly api = inject(UserApi);
  private readonly ownerApi = inject(OwnerApi);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);
  private readonly session = inject(Session);

  protected readonly table = new TableData<User>();
  protected readonly owners = signal<Owner[]>([]);
  protected readonly myId = computed(() => this.session.me()?.id ?? null);
  protected readonly columns = ['name', 'email', 'role', 'owner', 'disabled', 'actions'];
  private readonly ownerNames = computed(() => new Map(this.owners().map((owner) => [owner.id, owner.name])));
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    effect(() => this.table.attach(this.sort(), this.paginator()));
    this.table.source.filterPredicate = (user, filter) =>
      [user.name, user.email, ROLE_LABELS[user.role].label, this.ownerName(user.ownerId), user.disabled ? 'disabled' : 'active']
        .join(' ')
        .toLowerCase()
        .includes(filter);
  }

  ngOnInit(): void {
    this.reload();
  }

  protected reload(): void {
    this.table.load(this.api.list());
    this.ownerApi.list().subscribe({
      next: (owners) => this.owners.set(owners),
      error: (error: unknown) => this.notify.problem(`Owners could not be loaded: ${toApiProblem(error).message}`),
    });
  }

  protected roleOf(user: User): { label: string; icon: string } {
    return ROLE_LABELS[user.role];
  }

  protected ownerName(ownerId: number | null): string {
    return ownerId === null ? '' : (this.ownerNames().get(ownerId) ?? `Owner ${ownerId}`);
  }

  protected edit(user: User | null): void {
    const data: UserFormData = { user, owners: this.owners() };
    this.dialog
      .open<UserForm, UserFormData, User>(UserForm, { data, width: '560px', maxWidth: '96vw' })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.table.upsert(saved);
        this.notify.done(user ? `Saved ${saved.name}.` : `Added ${saved.name}.`);
      });
  }

  protected resetPassword(user: User): void {
    this.dialog
      .open<PasswordForm, User, boolean>(PasswordForm, { data: user, width: '480px', maxWidth: '96vw' })
      .afterClosed()
      .subscribe((done) => {
        if (done) this.notify.done(`New password set for ${user.name}.`);
      });
  }

  protected setDisabled(user: User, disabled: boolean): void {
    const data: ConfirmDialogData = disabled
      ? {
          title: `Disable ${user.name}?`,
          message: `${user.name} will no longer be able to sign in. You can enable the account again at any time.`,
          confirmLabel: 'Disable account',
          confirmIcon: 'person_off',
        }
      : {
          title: `Enable ${user.name}?`,
          message: `${user.name} will be able to sign in again with their current password.`,
          confirmLabel: 'Enable account',
          confirmIcon: 'person_check',
        };
    this.dialog
      .open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, { data, maxWidth: '96vw' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (!confirmed) return;
        this.api.update(user.id, { disabled }).subscribe({
          next: (saved) => {
            this.table.upsert(saved);
            this.notify.done(`${saved.name} is now ${saved.disabled ? 'disabled' : 'active'}.`);
          },
          error: (error: unknown) => this.notify.problem(toApiProblem(error).message),
        });
      });
  }
}
