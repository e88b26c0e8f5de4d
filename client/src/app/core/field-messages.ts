/**
 * The words shown under a form field for its validation errors. `server` carries a message the API
 * sent for this field (see `showServerErrors`). Pure (unit-tested under mocha).
 */

/**
 * Same as `passwordMinLength` in shared/api/auth.ts (the server's rule; a unit test holds them
 * together). Not imported from there because that module brings zod into the bundle.
 */
export const PASSWORD_MIN_LENGTH = 10;

export function validationMessage(errors: Readonly<Record<string, unknown>> | null | undefined, label: string): string | null {
  if (!errors) return null;
  const server = errors['server'];
  if (typeof server === 'string' && server !== '') return server;
  if (errors['required']) return `${label} is required.`;
  if (errors['email']) return 'Enter an e-mail address such as name@example.com.';
  const minLength = errors['minlength'] as { requiredLength?: number; actualLength?: number } | undefined;
  if (minLength?.requiredLength !== undefined) {
    const sofar = minLength.actualLength !== undefined ? ` (${minLength.actualLength} so far)` : '';
    return `${label} must have at least ${minLength.requiredLength} characters${sofar}.`;
  }
  const maxLength = errors['maxlength'] as { requiredLength?: number } | undefined;
  if (maxLength?.requiredLength !== undefined) {
    return `${label} can have at most ${maxLength.requiredLength} characters.`;
  }
  if (errors['blank']) return `${label} cannot be only spaces.`;
  return `${label} is not valid.`;
}
