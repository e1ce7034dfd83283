import { type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';
import { FIELD_LIMITS } from '@shared/engine';

/** The shortest password the API accepts. */
export const MIN_PASSWORD = FIELD_LIMITS.password.min;
/** The longest password the API accepts. */
export const MAX_PASSWORD = FIELD_LIMITS.password.max;

/** On a confirmation field: its value must equal the sibling control named `passwordField`. */
export function matchesSibling(passwordField: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const password = control.parent?.get(passwordField);
    if (!password || control.value === '' || control.value === password.value) return null;
    return { mismatch: true };
  };
}
