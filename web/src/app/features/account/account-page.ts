import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { DatePipe } from '@angular/common';
import { Router, RouterLink } from '@angular/router';
import { MatButton } from '@angular/material/button';
import { MatProgressBar } from '@angular/material/progress-bar';
import { AuthService } from '../../core/auth/auth-service';
import { FormSubmission } from '../../core/forms/form-submission';

@Component({
  selector: 'sv-account-page',
  imports: [DatePipe, MatButton, MatProgressBar, RouterLink],
  template: `
    <h1>Your account</h1>
    @if (auth.me(); as me) {
      <dl class="facts">
        <div>
          <dt>Name</dt>
          <dd>{{ me.displayName }}</dd>
        </div>
        <div>
          <dt>E-mail</dt>
          <dd>{{ me.email }}</dd>
        </div>
        <div>
          <dt>Role</dt>
          <dd class="role">{{ me.role }}</dd>
        </div>
        @if (me.createdAt) {
          <div>
            <dt>Member since</dt>
            <dd>{{ me.createdAt | date: 'longDate' }}</dd>
          </div>
        }
      </dl>
      <p>
        Study sets, study sheets and drills are under <a routerLink="/study">Study</a>.
        @if (me.role === 'reviewer' || me.role === 'admin') {
          Queries on doubtful values wait for an answer in <a routerLink="/review">Second look</a>.
        } @else {
          The queries you raise on doubtful values, from a species page, are under <a routerLink="/review">Your queries</a>.
        }
        @if (me.role === 'curator' || me.role === 'admin') {
          You keep the matrix on the <a routerLink="/desk">Matrix desk</a>: the working matrix, editions and the change log.
        } @else {
          Curators keep the matrix on the Matrix desk.
        }
      </p>
    } @else if (loading.problem(); as message) {
      <p class="problem" role="alert">{{ message }}</p>
    } @else {
      <mat-progress-bar mode="indeterminate" aria-label="Loading your account" />
    }
    <button mat-stroked-button type="button" (click)="signOut()">Sign out</button>
  `,
  styles: `
    .facts div {
      display: grid;
      grid-template-columns: 140px 1fr;
      gap: 8px;
      padding: 6px 0;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    dt {
      font-weight: 700;
    }
    dd {
      margin: 0;
    }
    .role {
      text-transform: capitalize;
    }
    .problem {
      padding: 12px;
      border-radius: 8px;
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class AccountPage {
  protected readonly auth = inject(AuthService);
  readonly #router = inject(Router);
  /** reading the account afresh: its failure is shown in place of the facts */
  protected readonly loading = new FormSubmission();

  constructor() {
    this.loading.run(() => this.auth.refreshMe());
  }

  protected signOut(): void {
    this.auth.signOut().subscribe({
      complete: () => void this.#router.navigateByUrl('/'),
      error: () => void this.#router.navigateByUrl('/'),
    });
  }
}
