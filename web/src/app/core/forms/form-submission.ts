import { DestroyRef, inject, signal } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { type AbstractControl, FormArray, FormGroup } from '@angular/forms';
import { type Observable, filter, finalize, of, switchMap, tap } from 'rxjs';
import { ApiProblem, readableError } from '../http/api-problem';

export interface SubmitOptions {
  /** Asked once the form is valid, e.g. a confirm dialog; the request is sent only when it answers `true`. */
  confirm?: () => Observable<boolean | undefined>;
  /**
   * Sees every failure after the server's field reasons are on their controls; return `true` when the
   * page shows this failure its own way and the problem line should stay empty.
   */
  onError?: (error: unknown) => boolean | void;
}

/**
 * One form's way to the server: refuses an invalid form (marking every field touched so its errors
 * show), says while the request is out (`busy`), and on failure puts the server's reason for each
 * field on the control of that name (error key `server`) and the whole sentence in `problem`.
 * Create it in a component's field initialiser: requests still out when the component goes are dropped.
 */
export class FormSubmission {
  readonly #destroyRef = inject(DestroyRef);
  readonly #busy = signal(false);
  readonly #problem = signal<string | null>(null);
  /** a request is out */
  readonly busy = this.#busy.asReadonly();
  /** the last failure in a sentence, cleared when the next submission starts */
  readonly problem = this.#problem.asReadonly();

  /** Checks the form, then sends `request()` and hands its answer to `onSuccess`. */
  submit<T>(form: AbstractControl, request: () => Observable<T>, onSuccess: (answer: T) => void, options: SubmitOptions = {}): void {
    if (this.#busy()) return;
    this.#problem.set(null);
    if (form.invalid) {
      form.markAllAsTouched();
      return;
    }
    this.#send(form, request, onSuccess, options);
  }

  /** Sends a request that has no form of its own (a page's load), reporting only busy and problem. */
  run<T>(request: () => Observable<T>, onSuccess: (answer: T) => void = () => undefined, options: SubmitOptions = {}): void {
    if (this.#busy()) return;
    this.#problem.set(null);
    this.#send(null, request, onSuccess, options);
  }

  /** Shows a problem found before anything was sent (e.g. a rule no single control holds). */
  refuse(message: string): void {
    this.#problem.set(message);
  }

  #send<T>(form: AbstractControl | null, request: () => Observable<T>, onSuccess: (answer: T) => void, options: SubmitOptions): void {
    const go = options.confirm ? options.confirm().pipe(filter((answer) => answer === true)) : of(true);
    go.pipe(
      tap(() => this.#busy.set(true)),
      switchMap(() => request()),
      finalize(() => this.#busy.set(false)),
      takeUntilDestroyed(this.#destroyRef),
    ).subscribe({
      next: onSuccess,
      error: (error: unknown) => {
        this.#busy.set(false);
        if (form) showFieldReasons(form, error);
        if (options.onError?.(error) === true) return;
        this.#problem.set(readableError(error));
      },
    });
  }
}

/** Puts the reason an API problem gives for a field on the form's control of that name. */
export function showFieldReasons(form: AbstractControl, error: unknown): void {
  if (!(error instanceof ApiProblem) || !(form instanceof FormGroup || form instanceof FormArray)) return;
  for (const [name, control] of Object.entries(form.controls as Record<string, AbstractControl>)) {
    const reason = error.reasonFor(name);
    if (!reason) continue;
    control.setErrors({ ...(control.errors ?? {}), server: reason });
    control.markAsTouched();
  }
}
