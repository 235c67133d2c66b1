import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, OnInit, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { Owner, Site } from '../../../../shared/contracts/api';
import { LocationPipe } from '../../sites/location-pipe';
import { SiteApi } from '../../core/site-api';
import { toApiProblem } from '../../ui/api-error';
import { Notify } from '../../ui/notify';
import { TableData } from '../../ui/table-data';
import { OwnerApi } from '../../core/owner-api';
import { SiteForm, SiteFormData } from './site-form';

@Component({
  selector: 'bw-site-setup-page',
  imports: [
    DecimalPipe,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSortModule,
    MatTableModule,
    MatTooltipModule,
    RouterLink,
    LocationPipe,
  ],
  templateUrl: './site-setup-page.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SiteSetupPage implements OnInit {
  private readonly api = inject(SiteApi);
  private readonly ownerApi = inject(OwnerApi);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);

  protected readonly table = new TableData<Site>();
  protected readonly owners = signal<Owner[]>([]);
  protected readonly columns = ['name', 'ownerName', 'location', 'elevationM', 'timeZone', 'albedo', 'unitCount', 'actions'];
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
    this.ownerApi.list().subscribe({
      next: (owners) => this.owners.set(owners),
      error: (error: unknown) => this.notify.problem(`Owners could not be loaded: ${toApiProblem(error).message}`),
    });
  }

  protected edit(site: Site | null): void {
    const data: SiteFormData = { site, owners: this.owners() };
    this.dialog
      .open<SiteForm, SiteFormData, Site>(SiteForm, { data, width: '640px', maxWidth: '96vw', autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.table.upsert(saved);
        this.notify.done(site ? `Saved ${saved.name}.` : `Added ${saved.name}.`);
      });
  }
}
