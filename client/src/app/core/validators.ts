import { AbstractControl, ValidationErrors } from '@angular/forms';

/** Rejects text that is only whitespace (a required check that `Validators.required` misses). */
export function notBlank(control: AbstractControl<string>): ValidationErrors | null {
  const value = control.value;
  return typeof value === 'string' && value.length > 0 && value.trim() === '' ? { blank: true } : null;
}
