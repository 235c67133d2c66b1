import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import type { Owner, Site, SiteInput } from '../../../../shared/contracts/api';
import { SiteApi } from '../../core/site-api';
import { applyServerErrors } from '../../ui/api-error';
import { errorText, inRange, oneOf, timeZones } from '../../ui/validation';

export interface SiteFormData {
  /** The site to edit, or null to add one. */
  site: Site | null;
  owners: Owner[];
}

const ZONES = timeZones();

/** Add or edit a site; closes with the saved site. */
@Component({
  selector: 'bw-site-form',
  imports: [
    ReactiveFormsModule,
    MatAutocompleteModule,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSlideToggleModule,
  ],
  templateUrl: './site-form.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SiteForm {
  private readonly api = inject(SiteApi);
  private readonly dialog = inject<MatDialogRef<SiteForm, Site>>(MatDialogRef);
  protected readonly data = inject<SiteFormData>(MAT_DIALOG_DATA);
  protected readonly errorText = errorText;

  protected readonly form = new FormGroup({
    name: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(120)] }),
    ownerId: new FormControl<number | null>(null, Validators.required),
    latitudeDeg: new FormControl<number | null>(null, [Validators.required, inRange(-90, 90, '°')]),
    longitudeDeg: new FormControl<number | null>(null, [Validators.required, inRange(-180, 180, '°')]),
    elevationM: new FormControl<number | null>(0, [Validators.required, inRange(-500, 9000, ' m')]),
    timeZone: new FormControl('', { nonNullable: true, validators: [Validators.required, oneOf(ZONES)] }),
    albedo: new FormControl<number | null>(0.2, [Validators.required, inRange(0, 1)]),
    indoor: new FormControl(false, { nonNullable: true }),
  });
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);

  private readonly zoneText = toSignal(this.form.controls.timeZone.valueChanges, { initialValue: '' });
  protected readonly zoneOptions = computed(() => {
    const text = this.zoneText().toLowerCase().replace(/\s+/g, '_');
    return (text ? ZONES.filter((zone) => zone.toLowerCase().includes(text)) : ZONES).slice(0, 60);
  });

  constructor() {
    const site = this.data.site;
    if (site) {
      this.form.setValue({
        name: site.name,
        ownerId: site.ownerId,
        latitudeDeg: site.latitudeDeg,
        longitudeDeg: site.longitudeDeg,
        elevationM: site.elevationM,
        timeZone: site.timeZone,
        albedo: site.albedo,
        indoor: site.indoor,
      });
    }
  }

  protected save(): void {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.problem.set('Some fields need attention. See the messages under each field.');
      return;
    }
    const value = this.form.getRawValue();
    const input: SiteInput = {
      name: value.name.trim(),
      ownerId: Number(value.ownerId),
      latitudeDeg: Number(value.latitudeDeg),
      longitudeDeg: Number(value.longitudeDeg),
      elevationM: Number(value.elevationM),
      timeZone: value.timeZone,
      albedo: Number(value.albedo),
      indoor: value.indoor,
    };
    this.saving.set(true);
    const request = this.data.site ? this.api.update(this.data.site.id, input) : this.api.create(input);
    request.subscribe({
      next: (site) => this.dialog.close(site),
      error: (error: unknown) => {
        this.saving.set(false);
        this.problem.set(applyServerErrors(this.form, error));
      },
    });
  }
}
