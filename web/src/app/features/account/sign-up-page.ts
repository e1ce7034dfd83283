import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { Router, RouterLink } from '@angular/router';
import { switchMap } from 'rxjs';
import { MatFormField, MatLabel, MatError, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatButton } from '@angular/material/button';
import { FIELD_LIMITS } from '@shared/engine';
import { MIN_PASSWORD } from './new-password';
import { AuthService } from '../../core/auth/auth-service';
import { FormSubmission } from '../../core/forms/form-submission';

@Component({
  selector: 'sv-sign-up-page',
  imports: [ReactiveFormsModule, RouterLink, MatFormField, MatLabel, MatError, MatHint, MatInput, MatButton],
  template: `
    <h1>Create an account</h1>
    <p>New accounts are learners. A coach or admin can give you another role later.</p>
    <form [formGroup]="form" (ngSubmit)="signUp()" novalidate>
      <mat-form-field appearance="outline">
        <mat-label>Name shown to others</mat-label>
        <input matInput formControlName="displayName" autocomplete="name" required [maxlength]="limits.displayName.max" />
        @if (form.controls.displayName.hasError('required')) {
          <mat-error>Enter a name.</mat-error>
        } @else if (form.controls.displayName.hasError('server')) {
          <mat-error>{{ form.controls.displayName.getError('server') }}</mat-error>
        }
      </mat-form-field>
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
        <input matInput type="password" formControlName="password" autocomplete="new-password" required />
        <mat-hint>At least {{ minPassword }} characters; a few unrelated words work well.</mat-hint>
        @if (form.controls.password.hasError('required')) {
          <mat-error>Choose a password.</mat-error>
        } @else if (form.controls.password.hasError('minlength')) {
          <mat-error>Use at least {{ minPassword }} characters.</mat-error>
        } @else if (form.controls.password.hasError('server')) {
          <mat-error>{{ form.controls.password.getError('server') }}</mat-error>
        }
      </mat-form-field>
      @if (submission.problem(); as message) {
        <p class="problem" role="alert">{{ message }}</p>
      }
      <div class="actions">
        <button mat-flat-button type="submit" [disabled]="submission.busy()">Create account</button>
        <a routerLink="/sign-in">I already have an account</a>
      </div>
    </form>
  `,
  styleUrl: './account-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class SignUpPage {
  readonly #auth = inject(AuthService);
  readonly #router = inject(Router);
  readonly #fb = inject(NonNullableFormBuilder);

  protected readonly minPassword = MIN_PASSWORD;
  protected readonly limits = FIELD_LIMITS;
  protected readonly form = this.#fb.group({
    displayName: ['', Validators.required],
    email: ['', [Validators.required, Validators.email]],
    password: ['', [Validators.required, Validators.minLength(this.minPassword)]],
  });
  protected readonly submission = new FormSubmission();

  protected signUp(): void {
    this.submission.submit(
      this.form,
      () => {
        const request = this.form.getRawValue();
        return this.#auth.signUp(request).pipe(switchMap(() => this.#auth.signIn({ email: request.email, password: request.password })));
      },
      () => void this.#router.navigateByUrl('/account'),
    );
  }
}
