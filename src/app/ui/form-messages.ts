import { AbstractControl, FormGroup, ValidationErrors, ValidatorFn } from '@angular/forms';
import { ApiError, messageOf } from '../core/api-error';

/** Inline message for a form control: what is wrong and how to fix it. Server messages win. */
export function controlMessage(control: AbstractControl, label: string): string {
  const errors = control.errors;
  if (!errors) return '';
  if (typeof errors['server'] === 'string') return errors['server'];
  if (errors['required']) return `Enter ${label}.`;
  if (errors['email']) return 'Enter a valid e-mail address, like name@example.org.';
  if (errors['minlength']) {
    return `Use at least ${(errors['minlength'] as { requiredLength: number }).requiredLength} characters.`;
  }
  if (errors['maxlength']) {
    return `Use at most ${(errors['maxlength'] as { requiredLength: number }).requiredLength} characters.`;
  }
  if (errors['mismatch']) return 'The two passwords differ. Type the same password twice.';
  if (errors['notAllowed']) return String(errors['notAllowed']);
  if (errors['blank']) return `Enter ${label} (not only spaces).`;
  return `Check ${label}.`;
}

/**
 * Puts the server's per-field messages (422 `fields`) on the matching controls.
 * Returns the field messages that matched no control, so the page can show them above the form.
 */
export function applyServerErrors(form: FormGroup, fields: Record<string, string>): string[] {
  const unmatched: string[] = [];
  for (const [name, message] of Object.entries(fields)) {
    const control = form.get(name);
    if (control) {
      control.setErrors({ ...(control.errors ?? {}), server: message });
      control.markAsTouched();
    } else {
      unmatched.push(message);
    }
  }
  return unmatched;
}

/** Group validator: `password` and `confirm` must match (error set on `confirm`). */
export function passwordsMatch(passwordKey: string, confirmKey: string): ValidatorFn {
  return (group: AbstractControl): ValidationErrors | null => {
    const password = group.get(passwordKey);
    const confirm = group.get(confirmKey);
    if (!password || !confirm) return null;
    const others = { ...(confirm.errors ?? {}) };
    delete others['mismatch'];
    if (confirm.value && password.value !== confirm.value) {
      confirm.setErrors({ ...others, mismatch: true });
      return { mismatch: true };
    }
    confirm.setErrors(Object.keys(others).length ? others : null);
    return null;
  };
}

/** Rejects values that are only whitespace. */
export const notBlank: ValidatorFn = (control) =>
  typeof control.value === 'string' && control.value.length > 0 && control.value.trim().length === 0
    ? { blank: true }
    : null;

/** Shortest password the client accepts (the server has the final word and may ask for more). */
export const MIN_PASSWORD_LENGTH = 8;

/**
 * The sentence above a form after a failed submit. When the server's field messages all landed on
 * visible fields, point at them; otherwise repeat the server's sentence plus any field message that
 * had no field to sit on.
 */
export function formProblem(error: unknown, form: FormGroup, prefix = ''): string {
  const lead = prefix ? `${prefix} ` : '';
  if (error instanceof ApiError) {
    const unmatched = applyServerErrors(form, error.fields);
    if (Object.keys(error.fields).length > 0 && unmatched.length === 0) {
      return `${lead}Correct the marked ${Object.keys(error.fields).length === 1 ? 'field' : 'fields'} and try again.`;
    }
    return [lead + error.message, ...unmatched].join(' ');
  }
  return lead + messageOf(error);
}
