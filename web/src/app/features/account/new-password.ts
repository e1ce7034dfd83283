import { type AbstractControl, type ValidationErrors, type ValidatorFn } from '@angular/forms';

/** The shortest password the API accepts. */
export const MIN_PASSWORD = 10;
/** The longest password the API accepts. */
export const MAX_PASSWORD = 200;

/** On a confirmation field: its value must equal the sibling control named `passwordField`. */
export function matchesSibling(passwordField: string): ValidatorFn {
  return (control: AbstractControl): ValidationErrors | null => {
    const password = control.parent?.get(passwordField);
    if (!password || control.value === '' || control.value === password.value) return null;
    return { mismatch: true };
  };
}
