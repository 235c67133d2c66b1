import { AbstractControl, ValidationErrors, ValidatorFn } from '@angular/forms';
import { SERIAL_PATTERN } from '../../../shared/contracts/wire-format';

export const MIN_PASSWORD_LENGTH = 10;
/** bcrypt on the server reads at most this many bytes of a password (UTF-8); longer ones are refused. */
export const MAX_PASSWORD_BYTES = 72;

/** At most `max` bytes once encoded as UTF-8 (accented letters take 2 bytes, most other scripts 3, emoji 4). */
export function maxUtf8Bytes(max: number): ValidatorFn {
  const encoder = new TextEncoder();
  return (control: AbstractControl): ValidationErrors | null => {
    const value = control.value;
    if (typeof value !== 'string' || !value) return null;
    const bytes = encoder.encode(value).length;
    return bytes <= max ? null : { maxBytes: { max, actual: bytes } };
  };
}

/** A number from `min` to `max` inclusive; the unit is only used in the message. */
export function inRange(min: number, max: number, unit = ''): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const value = control.value;
    if (value === null || value === undefined || value === '') return null;
    const number = Number(value);
    return Number.isFinite(number) && number >= min && number <= max ? null : { range: { min, max, unit } };
  };
}

/** The value must be greater than the sibling control `minName` (e.g. tilt max > tilt min). */
export function above(minName: string, minLabel: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const low = control.parent?.get(minName)?.value;
    const value = control.value;
    if (low === null || low === undefined || value === null || value === undefined || value === '') return null;
    return Number(value) > Number(low) ? null : { above: { minLabel } };
  };
}

/** The value must equal the sibling control `otherName` (a repeated password). */
export function matches(otherName: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const other = control.parent?.get(otherName)?.value;
    return !control.value || control.value === other ? null : { mismatch: true };
  };
}

/** The value must be one of `allowed` (e.g. an IANA time zone name). */
export function oneOf(allowed: readonly string[]): ValidatorFn {
  const set = new Set(allowed);
  return (control: AbstractControl): ValidationErrors | null => (!control.value || set.has(control.value) ? null : { oneOf: true });
}

export function serial(control: AbstractControl): ValidationErrors | null {
  return !control.value || SERIAL_PATTERN.test(control.value) ? null : { serial: true };
}

/** Minus sign, not hyphen, in messages about negative bounds. */
function show(value: number): string {
  return value < 0 ? `−${Math.abs(value)}` : String(value);
}

/**
 * One sentence for the first error on a control, naming the field. A message from the server
 * (`server`) wins, because it is the final word on what was wrong.
 */
export function errorText(errors: ValidationErrors | null | undefined, label: string): string {
  if (!errors) return '';
  if (errors['server']) return String(errors['server']);
  if (errors['required']) return `${label} is required.`;
  if (errors['email']) return 'Enter an email address like name@example.org.';
  if (errors['range']) {
    const { min, max, unit } = errors['range'] as { min: number; max: number; unit: string };
    return `${label} must be from ${show(min)} to ${show(max)}${unit}.`;
  }
  if (errors['above']) return `${label} must be greater than ${(errors['above'] as { minLabel: string }).minLabel}.`;
  if (errors['minlength']) {
    return `${label} needs at least ${(errors['minlength'] as { requiredLength: number }).requiredLength} characters.`;
  }
  if (errors['maxlength']) {
    return `${label} may have at most ${(errors['maxlength'] as { requiredLength: number }).requiredLength} characters.`;
  }
  if (errors['maxBytes']) {
    const { max } = errors['maxBytes'] as { max: number };
    return `${label} may have at most ${max} bytes: fewer characters when they are accented or not Latin.`;
  }
  if (errors['mismatch']) return `${label} does not match.`;
  if (errors['serial']) return 'Use 3–32 capital letters, digits or dashes, starting with a letter or digit.';
  if (errors['oneOf']) return `Choose a ${label.toLowerCase()} from the list.`;
  return `${label} is not valid.`;
}

/** Every IANA time zone the browser knows, for pickers. */
export function timeZones(): string[] {
  return typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : ['UTC'];
}
