import { ChangeDetectionStrategy, Component, type ElementRef, afterNextRender, inject, Injector, signal, viewChild } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { RouterLink } from '@angular/router';
import { MatFormField, MatLabel, MatError } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatButton } from '@angular/material/button';
import { MatProgressBar } from '@angular/material/progress-bar';
import { FIELD_LIMITS } from '@shared/engine';
import { FormSubmission } from '../../core/forms/form-submission';
import { AccountLinksService } from './account-links-service';

@Component({
  selector: 'sv-forgot-password-page',
  imports: [ReactiveFormsModule, RouterLink, MatFormField, MatLabel, MatError, MatInput, MatButton, MatProgressBar],
  template: `
    <h1>Forgot your password?</h1>
    @if (sent()) {
      <p class="notice" role="status" tabindex="-1" #sentNotice>
        If an account uses that address, we've sent a link to it. The link works once and expires soon; if nothing arrives within a few minutes, check your spam
        folder or ask again.
      </p>
      <div class="actions">
        <a mat-flat-button routerLink="/sign-in">Back to sign in</a>
        <button mat-stroked-button type="button" (click)="askAgain()">Use another address</button>
      </div>
    } @else {
      <p>Enter the e-mail address of your account and we will send you a link to choose a new password.</p>
      <form [formGroup]="form" (ngSubmit)="requestLink()" novalidate>
        <mat-form-field appearance="outline">
          <mat-label>E-mail</mat-label>
          <input matInput type="email" formControlName="email" autocomplete="email" required [maxlength]="limits.email.max" />
          @if (form.controls.email.hasError('required')) {
            <mat-error>Enter your e-mail address.</mat-error>
          } @else if (form.controls.email.hasError('email')) {
            <mat-error>That does not look like an e-mail address.</mat-error>
          } @else if (form.controls.email.hasError('server')) {
            <mat-error>{{ form.controls.email.getError('server') }}</mat-error>
          }
        </mat-form-field>
        @if (submission.busy()) {
          <mat-progress-bar mode="indeterminate" aria-label="Sending the link" />
        }
        @if (submission.problem(); as message) {
          <p class="problem" role="alert">{{ message }}</p>
        }
        <div class="actions">
          <button mat-flat-button type="submit" [disabled]="submission.busy()">Send the link</button>
          <a routerLink="/sign-in">Back to sign in</a>
        </div>
      </form>
    }
  `,
  styleUrl: './account-form.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class ForgotPasswordPage {
  readonly #links = inject(AccountLinksService);
  readonly #fb = inject(NonNullableFormBuilder);
  readonly #injector = inject(Injector);

  protected readonly sentNotice = viewChild<ElementRef<HTMLElement>>('sentNotice');
  protected readonly limits = FIELD_LIMITS;
  protected readonly form = this.#fb.group({
    email: ['', [Validators.required, Validators.email]],
  });
  protected readonly sent = signal(false);
  protected readonly submission = new FormSubmission();

  protected requestLink(): void {
    this.submission.submit(
      this.form,
      () => this.#links.requestPasswordReset(this.form.controls.email.value.trim()),
      () => {
        this.sent.set(true);
        // Keyboard and screen-reader users land on the answer rather than on a vanished button.
        afterNextRender(() => this.sentNotice()?.nativeElement.focus(), { injector: this.#injector });
      },
    );
  }

  protected askAgain(): void {
    this.form.reset();
    this.sent.set(false);
  }
}
