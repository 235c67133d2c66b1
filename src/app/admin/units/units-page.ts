import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, OnInit, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import type { Site, Unit } from '../../../../shared/contracts/api';
import { SiteApi } from '../../core/site-api';
import { UnitApi } from '../../core/unit-api';
import { toApiProblem } from '../../ui/api-error';
import { ConfirmDialog, ConfirmDialogData } from '../../ui/confirm-dialog';
import { Notify } from '../../ui/notify';
import { TableData } from '../../ui/table-data';
import { DeviceSecret, DeviceSecretData } from './device-secret';
import { UnitForm, UnitFormData, UnitFormResult } from './unit-form';

@Component({
  selector: 'bw-units-page',
  imports: [
    DecimalPipe,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatMenuModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
  ],
  templateUrl: './units-page.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitsPage implements OnInit {
  private readonly api = inject(UnitApi);
  private readonly siteApi = inject(SiteApi);
  private readonly dialog = inject(MatDialog);
  private readonly notify = inject(Notify);

  protected readonly table = new TableData<Unit>();
  protected readonly sites = signal<Site[]>([]);
  protected readonly siteFilter = signal<number | null>(null);
  protected readonly columns = ['serial', 'siteName', 'ratedPowerWp', 'detectorTiltDeg', 'firmware', 'disabled', 'actions'];
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    effect(() => this.table.attach(this.sort(), this.paginator()));
  }

  ngOnInit(): void {
    this.reload();
    this.siteApi.list().subscribe({
      next: (sites) => this.sites.set([...sites].sort((a, b) => a.name.localeCompare(b.name))),
      error: (error: unknown) => this.notify.problem(`Sites could not be loaded: ${toApiProblem(error).message}`),
    });
  }

  protected reload(): void {
    this.table.load(this.api.list(this.siteFilter() ?? undefined));
  }

  protected filterBySite(siteId: number | null): void {
    this.siteFilter.set(siteId);
    this.reload();
  }

  protected edit(unit: Unit | null): void {
    const data: UnitFormData = { unit, sites: this.sites() };
    this.dialog
      .open<UnitForm, UnitFormData, UnitFormResult>(UnitForm, { data, width: '720px', maxWidth: '96vw' })
      .afterClosed()
      .subscribe((result) => {
        if (!result) return;
        this.table.upsert(result.unit);
        if (result.deviceSecret) {
          this.showSecret({ serial: result.unit.serial, deviceSecret: result.deviceSecret, rotated: false });
        } else {
          this.notify.done(`Saved ${result.unit.serial}.`);
        }
      });
  }

  protected rotate(unit: Unit): void {
    const data: ConfirmDialogData = {
      title: `Issue a new device secret for ${unit.serial}?`,
      message:
        'The current secret stops working at once. The unit drops off the broker and cannot report until its controller has the new secret.',
      caution:
        'While offline the unit cannot receive stow commands from Brightward. Do this when the weather is calm, or make sure the unit stows by itself in high wind.',
      confirmLabel: 'Issue new secret',
      confirmIcon: 'key',
    };
    this.dialog
      .open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, { data, maxWidth: '96vw', width: '520px' })
      .afterClosed()
      .subscribe((confirmed) => {
        if (!confirmed) return;
        this.api.rotateSecret(unit.id).subscribe({
          next: ({ deviceSecret }) => this.showSecret({ serial: unit.serial, deviceSecret, rotated: true }),
          error: (error: unknown) => this.notify.problem(toApiProblem(error).message),
        });
      });
  }

  private showSecret(data: DeviceSecretData): void {
    this.dialog.open<DeviceSecret, DeviceSecretData, boolean>(DeviceSecret, {
      data,
      disableClose: true,
      width: '560px',
      maxWidth: '96vw',
    });
  }
}
