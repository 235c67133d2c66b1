import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import type { Site, Unit, UnitInput } from '../../../../shared/contracts/api';
import { WIRE_RANGES } from '../../../../shared/contracts/wire-format';
import { UnitApi, UnitWithSecret } from '../../core/unit-api';
import { applyServerErrors } from '../../ui/api-error';
import { above, errorText, inRange, serial } from '../../ui/validation';

export interface UnitFormData {
  /** The unit to edit, or null to add one. */
  unit: Unit | null;
  sites: Site[];
}

/** What the dialog closes with: the saved unit, plus the device secret when the unit is new. */
export type UnitFormResult = { unit: Unit; deviceSecret?: string };

@Component({
  selector: 'bw-unit-form',
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatDialogModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSlideToggleModule,
  ],
  templateUrl: './unit-form.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitForm {
  private readonly api = inject(UnitApi);
  private readonly dialog = inject<MatDialogRef<UnitForm, UnitFormResult>>(MatDialogRef);
  protected readonly data = inject<UnitFormData>(MAT_DIALOG_DATA);
  protected readonly errorText = errorText;

  protected readonly form = new FormGroup({
    serial: new FormControl('', { nonNullable: true, validators: [Validators.required, serial] }),
    siteId: new FormControl<number | null>(null, Validators.required),
    ratedPowerWp: new FormControl<number | null>(400, [Validators.required, inRange(1, 100000, ' Wp')]),
    detectorTiltDeg: new FormControl<number | null>(5, [Validators.required, inRange(...WIRE_RANGES.detectorTiltDeg, '°')]),
    tiltMinDeg: new FormControl<number | null>(0, [Validators.required, inRange(0, 90, '°')]),
    tiltMaxDeg: new FormControl<number | null>(80, [Validators.required, inRange(0, 90, '°'), above('tiltMinDeg', 'the lowest tilt')]),
    azimuthMinDeg: new FormControl<number | null>(0, [Validators.required, inRange(0, 360, '°')]),
    azimuthMaxDeg: new FormControl<number | null>(360, [
      Validators.required,
      inRange(0, 360, '°'),
      above('azimuthMinDeg', 'the first azimuth'),
    ]),
    planXM: new FormControl<number | null>(0, [Validators.required, inRange(-10000, 10000, ' m')]),
    planYM: new FormControl<number | null>(0, [Validators.required, inRange(-10000, 10000, ' m')]),
    firmware: new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(40)] }),
    disabled: new FormControl(false, { nonNullable: true }),
    weatherStation: new FormControl(false, { nonNullable: true }),
  });
  protected readonly saving = signal(false);
  protected readonly problem = signal<string | null>(null);

  constructor() {
    const unit = this.data.unit;
    if (unit) {
      this.form.setValue({
        serial: unit.serial,
        siteId: unit.siteId,
        ratedPowerWp: unit.ratedPowerWp,
        detectorTiltDeg: unit.detectorTiltDeg,
        tiltMinDeg: unit.tiltMinDeg,
        tiltMaxDeg: unit.tiltMaxDeg,
        azimuthMinDeg: unit.azimuthMinDeg,
        azimuthMaxDeg: unit.azimuthMaxDeg,
        planXM: unit.planXM,
        planYM: unit.planYM,
        firmware: unit.firmware,
        disabled: unit.disabled,
        weatherStation: unit.weatherStation,
      });
    }
    // A changed lower bound can make the upper bound valid or invalid.
    const destroyRef = inject(DestroyRef);
    const { tiltMinDeg, tiltMaxDeg, azimuthMinDeg, azimuthMaxDeg } = this.form.controls;
    tiltMinDeg.valueChanges.pipe(takeUntilDestroyed(destroyRef)).subscribe(() => tiltMaxDeg.updateValueAndValidity());
    azimuthMinDeg.valueChanges.pipe(takeUntilDestroyed(destroyRef)).subscribe(() => azimuthMaxDeg.updateValueAndValidity());
  }

  protected save(): void {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.problem.set('Some fields need attention. See the messages under each field.');
      return;
    }
    const value = this.form.getRawValue();
    const input: UnitInput = {
      serial: value.serial.trim(),
      siteId: Number(value.siteId),
      ratedPowerWp: Number(value.ratedPowerWp),
      detectorTiltDeg: Number(value.detectorTiltDeg),
      tiltMinDeg: Number(value.tiltMinDeg),
      tiltMaxDeg: Number(value.tiltMaxDeg),
      azimuthMinDeg: Number(value.azimuthMinDeg),
      azimuthMaxDeg: Number(value.azimuthMaxDeg),
      planXM: Number(value.planXM),
      planYM: Number(value.planYM),
      firmware: value.firmware.trim(),
      disabled: value.disabled,
      weatherStation: value.weatherStation,
    };
    this.saving.set(true);
    const fail = (error: unknown): void => {
      this.saving.set(false);
      this.problem.set(applyServerErrors(this.form, error));
    };
    if (this.data.unit) {
      this.api.update(this.data.unit.id, input).subscribe({ next: (unit) => this.dialog.close({ unit }), error: fail });
    } else {
      this.api.create(input).subscribe({ next: (created: UnitWithSecret) => this.dialog.close(created), error: fail });
    }
  }
}
