import { ChangeDetectionStrategy, Component, effect, inject, OnInit, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import type { Owner } from '../../../../shared/contracts/api';
import { Notify } from '../../ui/notify';
import { TableData } from '../../ui/table-data';
import { OwnerApi } from '../../core/owner-api';
import { OwnerForm } from './owner-form';

@Component({
  selector: 'bw-owners-page',
  imports: [
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSortModule,
    MatTableModule,
  ],
  templateUrl: './owners-page.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OwnersPage implements OnInit {
  private readonly api = inject(OwnerApi);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);

  protected readonly table = new TableData<Owner>();
  protected readonly columns = ['name', 'contactEmail', 'siteCount', 'actions'];
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    effect(() => this.table.attach(this.sort(), this.paginator()));
  }

  ngOnInit(): void {
    this.reload();
  }

  protected reload(): void {
    this.table.load(this.api.list());
  }

  protected edit(owner: Owner | null): void {
    this.dialog
      .open<OwnerForm, Owner | null, Owner>(OwnerForm, { data: owner, width: '520px', maxWidth: '96vw' })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.table.upsert(saved);
        this.notify.done(owner ? `Saved ${saved.name}.` : `Added ${saved.name}.`);
      });
  }
}
