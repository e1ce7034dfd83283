import { ChangeDetectionStrategy, Component, inject, input, output, viewChild } from '@angular/core';
import { FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { FIELD_LIMITS } from '@shared/engine';
import { type CellQuery, QueryService } from '../../core/api/query-service';
import { FormSubmission } from '../../core/forms/form-submission';
import { type QueryWorked, movedOn } from './query-worked';

/** A reviewer answers a query with evidence; answering again replaces the answer. */
@Component({
  selector: 'sv-query-answer-form',
  imports: [ReactiveFormsModule, MatButton, MatFormField, MatLabel, MatHint, MatError, MatInput],
  template: `
    <section class="panel" aria-labelledby="answer-heading">
      <h2 id="answer-heading">{{ query().state === 'answered' ? 'Answer again' : 'Answer with evidence' }}</h2>
      <form class="stack" [formGroup]="form" (ngSubmit)="answerQuery()" novalidate>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Answer</mat-label>
          <textarea matInput formControlName="answer" rows="3" [maxlength]="limits.queryText.max" required></textarea>
          <mat-hint>What the cell should say and why, for the person who raised it</mat-hint>
          @if (fieldError('answer'); as message) {
            <mat-error>{{ message }}</mat-error>
          }
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Evidence</mat-label>
          <textarea matInput formControlName="evidence" rows="2" [maxlength]="limits.queryText.max"></textarea>
          <mat-hint>Where the answer comes from: a flora, a specimen, a photo</mat-hint>
          @if (fieldError('evidence'); as message) {
            <mat-error>{{ message }}</mat-error>
          }
        </mat-form-field>
        @if (submission.problem(); as message) {
          <p class="problem small" role="alert">The answer was not saved. {{ message }}</p>
        }
        <div class="actions">
          <button mat-flat-button type="submit" [disabled]="locked() || busy()">Save answer</button>
        </div>
      </form>
    </section>
  `,
  styleUrl: './query-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class QueryAnswerForm {
  protected readonly limits = FIELD_LIMITS;
  readonly #queries = inject(QueryService);
  readonly #fb = inject(NonNullableFormBuilder);

  readonly query = input.required<CellQuery>();
  /** another action on this query is under way */
  readonly locked = input(false);
  readonly answered = output<QueryWorked>();
  /** someone else moved the query on meanwhile */
  readonly moved = output();

  protected readonly submission = new FormSubmission();
  readonly busy = this.submission.busy;

  /** resetting through the directive also forgets that the form was submitted */
  private readonly formDirective = viewChild.required(FormGroupDirective);
  protected readonly form = this.#fb.group({
    answer: ['', [Validators.required, Validators.minLength(FIELD_LIMITS.queryText.min), Validators.maxLength(FIELD_LIMITS.queryText.max)]],
    evidence: ['', Validators.maxLength(FIELD_LIMITS.queryText.max)],
  });

  protected fieldError(field: 'answer' | 'evidence'): string | null {
    const control = this.form.controls[field];
    if (control.hasError('required')) return 'Write the answer.';
    if (control.hasError('minlength')) return 'Write at least 3 characters.';
    if (control.hasError('maxlength')) return 'At most 4000 characters.';
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected answerQuery(): void {
    this.submission.submit(
      this.form,
      () => {
        const { answer, evidence } = this.form.getRawValue();
        return this.#queries.answerQuery(this.query().id, answer.trim(), evidence.trim());
      },
      (query) => {
        this.formDirective().resetForm();
        this.answered.emit({ query, notice: 'Your answer is saved; the query is answered.' });
      },
      {
        onError: (error) => {
          if (movedOn(error)) this.moved.emit();
        },
      },
    );
  }
}
