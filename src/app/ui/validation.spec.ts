import { FormControl, FormGroup } from '@angular/forms';
import { above, errorText, inRange, maxUtf8Bytes, oneOf, serial } from './validation';

describe('form validation', () => {
  it('checks ranges inclusively and leaves empty values to required', () => {
    const tilt = new FormControl<number | null>(null, inRange(0.5, 45, '°'));
    expect(tilt.errors).toBeNull();
    for (const ok of [0.5, 10, 45]) {
      tilt.setValue(ok);
      expect(tilt.errors).toBeNull();
    }
    tilt.setValue(0.4);
    expect(errorText(tilt.errors, 'Detector tilt')).toBe('Detector tilt must be from 0.5 to 45°.');
    tilt.setValue(45.01);
    expect(tilt.hasError('range')).toBe(true);
  });

  it('requires the upper limit above the lower one', () => {
    const form = new FormGroup({
      tiltMinDeg: new FormControl(10),
      tiltMaxDeg: new FormControl(10, above('tiltMinDeg', 'the lowest tilt')),
    });
    form.controls.tiltMaxDeg.updateValueAndValidity();
    expect(errorText(form.controls.tiltMaxDeg.errors, 'Highest tilt')).toBe('Highest tilt must be greater than the lowest tilt.');
    form.controls.tiltMaxDeg.setValue(11);
    expect(form.controls.tiltMaxDeg.errors).toBeNull();
  });

  it('accepts serial numbers of capitals, digits and dashes only', () => {
    const control = new FormControl('', serial);
    for (const good of ['QHL-001', 'A1B', 'X'.repeat(32)]) {
      control.setValue(good);
      expect(control.errors, good).toBeNull();
    }
    for (const bad of ['-AB1', 'ab-001', 'AB', 'X'.repeat(33), 'QHL 001']) {
      control.setValue(bad);
      expect(control.hasError('serial'), bad).toBe(true);
    }
  });

  it('accepts only listed values', () => {
    const zone = new FormControl('Europe/Berlin', oneOf(['Europe/Berlin', 'UTC']));
    expect(zone.errors).toBeNull();
    zone.setValue('Europe/Atlantis');
    expect(errorText(zone.errors, 'Time zone')).toBe('Choose a time zone from the list.');
  });

  it('prefers the server’s message', () => {
    expect(errorText({ required: true, server: 'Taken.' }, 'Name')).toBe('Taken.');
  });

  it('counts a password in UTF-8 bytes, as the server does: 72 fit, 73 do not', () => {
    const password = new FormControl('', maxUtf8Bytes(72));
    password.setValue('a'.repeat(72));
    expect(password.errors).toBeNull();
    password.setValue('é'.repeat(36));
    expect(password.errors).toBeNull();
    password.setValue(`${'é'.repeat(36)}a`);
    expect(password.errors).toEqual({ maxBytes: { max: 72, actual: 73 } });
    expect(errorText(password.errors, 'Password')).toBe(
      'Password may have at most 72 bytes: fewer characters when they are accented or not Latin.',
    );
  });
});
