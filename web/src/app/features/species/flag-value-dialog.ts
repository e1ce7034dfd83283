import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { RouterLink } from '@angular/router';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogActions, MatDialogClose, MatDialogContent, MatDialogTitle } from '@angular/material/dialog';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { FIELD_LIMITS } from '@shared/engine';
import { type CellQuery, QueryService } from '../../core/api/query-service';
import { ApiProblem, readableError } from '../../core/http/api-problem';

export interface FlagValueData {
  taxonId: string;
  speciesName: string;
  traitCode: string;
  traitLabel: string;
  /** the value as coded, in words */
  words: string;
}

/** Raises a query on one coded value: the person says what they saw; reviewers take a second look. */
@Component({
  selector: 'sv-flag-value-dialog',
  imports: [
    RouterLink,
    ReactiveFormsModule,
    MatDialogTitle,
    MatDialogContent,
    MatDialogActions,
    MatDialogClose,
    MatButton,
    MatAnchor,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatInput,
  ],
  template: `
    @if (raised(); as query) {
      <h2 mat-dialog-title>Query {{ query.id }} is open</h2>
      <mat-dialog-content>
        <p role="status">
          Thank you. A reviewer will take a second look at {{ data.traitLabel }} for {{ data.speciesName }} and answer with evidence. You can follow it under
          your queries.
        </p>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Close</button>
        <a mat-flat-button [routerLink]="['/review', query.id]" mat-dialog-close>Open query {{ query.id }}</a>
      </mat-dialog-actions>
    } @else {
      <h2 mat-dialog-title>Query this value?</h2>
      <form [formGroup]="form" (ngSubmit)="raiseQuery()" novalidate>
        <mat-dialog-content>
          <p>
            <strong>{{ data.speciesName }} · {{ data.traitLabel }}:</strong> coded as “{{ data.words }}”.
          </p>
          <mat-form-field appearance="outline" class="note" subscriptSizing="dynamic">
            <mat-label>What did you see?</mat-label>
            <textarea matInput formControlName="note" rows="4" [maxlength]="limits.queryText.max" required cdkFocusInitial></textarea>
            <mat-hint>For example: “Saw bundles of two on a young tree.” Say where and on how many trees.</mat-hint>
            @if (noteError(); as message) {
              <mat-error>{{ message }}</mat-error>
            }
          </mat-form-field>
          @if (problem(); as message) {
            <p class="problem" role="alert">The query was not raised. {{ message }}</p>
          }
        </mat-dialog-content>
        <mat-dialog-actions align="end">
          <button mat-button type="button" mat-dialog-close>Cancel</button>
          <button mat-flat-button type="submit" [disabled]="sending()">Raise query</button>
        </mat-dialog-actions>
      </form>
    }
  `,
  styles: `
    .note {
      width: 100%;
      margin-top: 8px;
    }
    .problem {
      padding: 8px 12px;
      border-radius: 8px;
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FlagValueDialog {
  readonly #queries = inject(QueryService);
  protected readonly data = inject<FlagValueData>(MAT_DIALOG_DATA);
  protected readonly limits = FIELD_LIMITS;

  protected readonly form = inject(NonNullableFormBuilder).group({
    note: ['', [Validators.required, Validators.minLength(FIELD_LIMITS.queryText.min), Validators.maxLength(FIELD_LIMITS.queryText.max)]],
  });
  protected readonly raised = signal<CellQuery | null>(null);
  protected readonly sending = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected noteError(): string | null {
    const control = this.form.controls.note;
    if (control.hasError('required')) return 'Say what you saw that does not match.';
    if (control.hasError('minlength')) return `Write at least ${FIELD_LIMITS.queryText.min} characters.`;
    if (control.hasError('maxlength')) return `At most ${FIELD_LIMITS.queryText.max} characters.`;
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected raiseQuery(): void {
    this.problem.set(null);
    const note = this.form.controls.note.value.trim();
    if (note.length < 3) this.form.controls.note.setValue(note);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.sending.set(true);
    this.#queries.raiseQuery(this.data.taxonId, this.data.traitCode, note).subscribe({
      next: (query) => {
        this.sending.set(false);
        this.raised.set(query);
      },
      error: (error: unknown) => {
        this.sending.set(false);
        const reason = error instanceof ApiProblem ? error.reasonFor('note') : undefined;
        if (reason) this.form.controls.note.setErrors({ server: reason });
        this.problem.set(readableError(error));
      },
    });
  }
}
