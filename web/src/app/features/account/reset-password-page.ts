import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { Router, RouterLink } from '@angular/router';
import { MatFormField, MatLabel, MatError, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatButton } from '@angular/material/button';
import { MatProgressBar } from '@angular/material/progress-bar';
import { FormSubmission } from '../../core/forms/form-submission';
import { AccountLinksService, isLinkNotValid } from './account-links-service';
import { MAX_PASSWORD, MIN_PASSWORD, matchesSibling } from './new-password';

@Component({
  selector: 'sv-reset-password-page',
  imports: [ReactiveFormsModule, RouterLink, MatFormField, MatLabel, MatError, MatHint, MatInput, MatButton, MatProgressBar],
  template: `
    <h1>Choose a new password</h1>
    @if (linkGone()) {
      <div class="problem link-gone" role="alert">
        <p>This reset link cannot be used any more: it has been used already, has expired, or was copied incompletely.</p>
        <p>Ask for a new one; it arrives by e-mail within a few minutes.</p>
      </div>
      <div class="actions">
        <a mat-flat-button routerLink="/forgot-password">Send me a new link</a>
        <a routerLink="/sign-in">Back to sign in</a>
      </div>
    } @else {
      <p>Pick a password you have not used here before. Every device signed in to this account is signed out.</p>
      <form [formGroup]="form" (ngSubmit)="setPassword()" novalidate>
        <mat-form-field appearance="outline">
          <mat-label>New password</mat-label>
          <input
            matInput
            type="password"
            formControlName="password"
            autocomplete="new-password"
            required
            [attr.maxlength]="maxPassword"
            (input)="recheckConfirmation()"
          />
          <mat-hint>At least {{ minPassword }} characters; a few unrelated words work well.</mat-hint>
          @if (form.controls.password.hasError('required')) {
            <mat-error>Choose a password.</mat-error>
          } @else if (form.controls.password.hasError('minlength')) {
            <mat-error>Use at least {{ minPassword }} characters.</mat-error>
          } @else if (form.controls.password.hasError('server')) {
            <mat-error>{{ form.controls.password.getError('server') }}</mat-error>
          }
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>New password again</mat-label>
          <input matInput type="password" formControlName="confirmation" autocomplete="new-password" required [attr.maxlength]="maxPassword" />
          @if (form.controls.confirmation.hasError('required')) {
            <mat-error>Type the new password once more.</mat-error>
          } @else if (form.controls.confirmation.hasError('mismatch')) {
            <mat-error>The two passwords are not the same.</mat-error>
          }
        </mat-form-field>
        @if (submission.busy()) {
          <mat-progress-bar mode="indeterminate" aria-label="Saving the new password" />
        }
        @if (submission.problem(); as message) {
          <p class="problem" role="alert">{{ message }}</p>
        }
        <div class="actions">
          <button mat-flat-button type="submit" [disabled]="submission.busy()">Set new password</button>
          <a routerLink="/sign-in">Back to sign in</a>
        </div>
      </form>
    }
  `,
  styleUrl: './account-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class ResetPasswordPage {
  readonly #links = inject(AccountLinksService);
  readonly #router = inject(Router);
  readonly #fb = inject(NonNullableFormBuilder);

  /** the single-use token from the e-mailed link */
  readonly token = input.required<string>();

  protected readonly minPassword = MIN_PASSWORD;
  protected readonly maxPassword = MAX_PASSWORD;
  protected readonly form = this.#fb.group({
    password: ['', [Validators.required, Validators.minLength(MIN_PASSWORD), Validators.maxLength(MAX_PASSWORD)]],
    confirmation: ['', [Validators.required, matchesSibling('password')]],
  });
  protected readonly linkGone = signal(false);
  protected readonly submission = new FormSubmission();

  protected recheckConfirmation(): void {
    this.form.controls.confirmation.updateValueAndValidity();
  }

  protected setPassword(): void {
    this.submission.submit(
      this.form,
      () => this.#links.resetPassword(this.token(), { password: this.form.controls.password.value }),
      () => void this.#router.navigate(['/sign-in'], { queryParams: { done: 'reset' } }),
      {
        onError: (error) => {
          if (!isLinkNotValid(error)) return false;
          this.linkGone.set(true);
          return true;
        },
      },
    );
  }
}
