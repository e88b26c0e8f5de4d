import { FormGroup } from '@angular/forms';
import { ApiError, splitFieldErrors } from './api-error';

/**
 * Puts the API's field messages on the matching controls of `form` (as the `server` error, which
 * the next edit of that field clears) and returns the message to show above the form, if any.
 */
export function showServerErrors(form: FormGroup, error: ApiError): string | null {
  const { byField, formMessage } = splitFieldErrors(error, Object.keys(form.controls));
  for (const [field, message] of Object.entries(byField)) {
    const control = form.get(field);
    if (!control) continue;
    control.setErrors({ ...(control.errors ?? {}), server: message });
    control.markAsTouched();
  }
  return formMessage;
}
