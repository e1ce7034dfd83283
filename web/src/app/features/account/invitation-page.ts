import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { Router, RouterLink } from '@angular/router';
import { switchMap, tap } from 'rxjs';
import { MatFormField, MatLabel, MatError, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatButton } from '@angular/material/button';
import { MatProgressBar } from '@angular/material/progress-bar';
import { FIELD_LIMITS } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { FormSubmission } from '../../core/forms/form-submission';
import { AccountLinksService, isLinkNotValid } from './account-links-service';
import { MAX_PASSWORD, MIN_PASSWORD } from './new-password';

@Component({
  selector: 'sv-invitation-page',
  imports: [ReactiveFormsModule, RouterLink, MatFormField, MatLabel, MatError, MatHint, MatInput, MatButton, MatProgressBar],
  template: `
    <h1>Accept your invitation</h1>
    @if (linkGone()) {
      <div class="problem link-gone" role="alert">
        <p>This invitation cannot be used any more: it has been accepted already, has expired, or the link was copied incompletely.</p>
        <p>Ask the person who invited you to send a new one. If you already accepted it, sign in instead.</p>
      </div>
      <div class="actions">
        <a mat-flat-button routerLink="/sign-in">Sign in</a>
      </div>
    } @else {
      <p>You have been invited with a role already chosen for you. Your e-mail address is the one the invitation was sent to.</p>
      <form [formGroup]="form" (ngSubmit)="acceptInvitation()" novalidate>
        <mat-form-field appearance="outline">
          <mat-label>Name shown to others</mat-label>
          <input matInput formControlName="displayName" autocomplete="name" required [maxlength]="limits.displayName.max" />
          @if (form.controls.displayName.hasError('required') || form.controls.displayName.hasError('pattern')) {
            <mat-error>Enter a name.</mat-error>
          } @else if (form.controls.displayName.hasError('server')) {
            <mat-error>{{ form.controls.displayName.getError('server') }}</mat-error>
          }
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Password</mat-label>
          <input matInput type="password" formControlName="password" autocomplete="new-password" required [attr.maxlength]="maxPassword" />
          <mat-hint>At least {{ minPassword }} characters; a few unrelated words work well.</mat-hint>
          @if (form.controls.password.hasError('required')) {
            <mat-error>Choose a password.</mat-error>
          } @else if (form.controls.password.hasError('minlength')) {
            <mat-error>Use at least {{ minPassword }} characters.</mat-error>
          } @else if (form.controls.password.hasError('server')) {
            <mat-error>{{ form.controls.password.getError('server') }}</mat-error>
          }
        </mat-form-field>
        @if (submission.busy()) {
          <mat-progress-bar mode="indeterminate" aria-label="Creating your account" />
        }
        @if (submission.problem(); as message) {
          <p class="problem" role="alert">{{ message }}</p>
        }
        <div class="actions">
          <button mat-flat-button type="submit" [disabled]="submission.busy()">Create my account</button>
        </div>
      </form>
    }
  `,
  styleUrl: './account-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class InvitationPage {
  readonly #links = inject(AccountLinksService);
  readonly #auth = inject(AuthService);
  readonly #router = inject(Router);
  readonly #fb = inject(NonNullableFormBuilder);

  /** the single-use token from the e-mailed invitation */
  readonly token = input.required<string>();

  protected readonly minPassword = MIN_PASSWORD;
  protected readonly maxPassword = MAX_PASSWORD;
  protected readonly limits = FIELD_LIMITS;
  protected readonly form = this.#fb.group({
    displayName: ['', [Validators.required, Validators.pattern(/\S/)]],
    password: ['', [Validators.required, Validators.minLength(MIN_PASSWORD), Validators.maxLength(MAX_PASSWORD)]],
  });
  protected readonly linkGone = signal(false);
  protected readonly submission = new FormSubmission();

  protected acceptInvitation(): void {
    let accepted = false;
    this.submission.submit(
      this.form,
      () => {
        const { displayName, password } = this.form.getRawValue();
        return this.#links.acceptInvitation(this.token(), { displayName: displayName.trim(), password }).pipe(
          tap(() => (accepted = true)),
          // accepting signs the new account in: keep that session rather than open a second one
          switchMap((account) => this.#auth.adoptSession(account.session)),
        );
      },
      () => void this.#router.navigateByUrl('/account'),
      {
        onError: (error) => {
          // The account exists once the invitation is accepted; only taking over its session failed.
          if (accepted) void this.#router.navigate(['/sign-in'], { queryParams: { done: 'invitation' } });
          else if (isLinkNotValid(error)) this.linkGone.set(true);
          else return false;
          return true;
        },
      },
    );
  }
}
