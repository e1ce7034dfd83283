import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { Router, RouterLink } from '@angular/router';
import { MatFormField, MatLabel, MatError } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatButton } from '@angular/material/button';
import { AuthService } from '../../core/auth/auth-service';
import { FormSubmission } from '../../core/forms/form-submission';

/** Only same-app paths are followed after sign-in, never another site. */
export function safeNext(next: string | undefined): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/account';
}

const DONE_NOTICES: Readonly<Record<string, string>> = {
  reset: 'Your password is changed. Sign in with the new one.',
  invitation: 'Your account is ready. Sign in with the invited e-mail address and the password you chose.',
};

@Component({
  selector: 'sv-sign-in-page',
  imports: [ReactiveFormsModule, RouterLink, MatFormField, MatLabel, MatError, MatInput, MatButton],
  template: `
    <h1>Sign in</h1>
    <p>Anyone can sift without an account. Sign in to keep study sets, drills and curator work.</p>
    @if (notice(); as message) {
      <p class="notice" role="status">{{ message }}</p>
    }
    <form [formGroup]="form" (ngSubmit)="signIn()" novalidate>
      <mat-form-field appearance="outline">
        <mat-label>E-mail</mat-label>
        <input matInput type="email" formControlName="email" autocomplete="email" required />
        @if (form.controls.email.hasError('required')) {
          <mat-error>Enter your e-mail address.</mat-error>
        } @else if (form.controls.email.hasError('email')) {
          <mat-error>That does not look like an e-mail address.</mat-error>
        } @else if (form.controls.email.hasError('server')) {
          <mat-error>{{ form.controls.email.getError('server') }}</mat-error>
        }
      </mat-form-field>
      <mat-form-field appearance="outline">
        <mat-label>Password</mat-label>
        <input matInput type="password" formControlName="password" autocomplete="current-password" required />
        @if (form.controls.password.hasError('required')) {
          <mat-error>Enter your password.</mat-error>
        } @else if (form.controls.password.hasError('server')) {
          <mat-error>{{ form.controls.password.getError('server') }}</mat-error>
        }
      </mat-form-field>
      @if (submission.problem(); as message) {
        <p class="problem" role="alert">{{ message }}</p>
      }
      <div class="actions">
        <button mat-flat-button type="submit" [disabled]="submission.busy()">Sign in</button>
        <a routerLink="/forgot-password">Forgot your password?</a>
        <a routerLink="/sign-up">Create an account</a>
      </div>
    </form>
  `,
  styleUrl: './account-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class SignInPage {
  readonly #auth = inject(AuthService);
  readonly #router = inject(Router);
  readonly #fb = inject(NonNullableFormBuilder);

  /** where to go after signing in (`?next=`) */
  readonly next = input<string>();
  /** what the visitor has just finished elsewhere (`?done=`), confirmed above the form */
  readonly done = input<string>();

  protected readonly notice = computed(() => DONE_NOTICES[this.done() ?? ''] ?? null);

  protected readonly form = this.#fb.group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', Validators.required],
  });
  protected readonly submission = new FormSubmission();

  protected signIn(): void {
    this.submission.submit(
      this.form,
      () => this.#auth.signIn(this.form.getRawValue()),
      () => void this.#router.navigateByUrl(safeNext(this.next())),
    );
  }
}
