import { ChangeDetectionStrategy, Component, inject, input, output } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatDialog } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import { MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { FIELD_LIMITS } from '@shared/engine';
import { type CellQuery, QueryService } from '../../core/api/query-service';
import { FormSubmission } from '../../core/forms/form-submission';
import { confirmQuery } from './confirm-query-dialog';
import { type QueryWorked, movedOn } from './query-worked';
import type { QueryCellWords } from './review-words';

/** A reviewer settles an answered query, keeping the cell, after confirming. */
@Component({
  selector: 'sv-query-settle',
  imports: [ReactiveFormsModule, MatButton, MatFormField, MatLabel, MatInput],
  template: `
    <section class="panel" aria-labelledby="settle-heading">
      <h2 id="settle-heading">Settle, keeping the cell</h2>
      <form class="stack" [formGroup]="form" (ngSubmit)="confirmSettle()" novalidate>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Note (optional)</mat-label>
          <textarea matInput formControlName="note" rows="2" [maxlength]="limits.queryText.max"></textarea>
        </mat-form-field>
        @if (submission.problem(); as message) {
          <p class="problem small" role="alert">The query was not settled. {{ message }}</p>
        }
        <div class="actions">
          <button mat-stroked-button type="submit" [disabled]="locked() || busy()">Settle…</button>
        </div>
      </form>
    </section>
  `,
  styleUrl: './query-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class QuerySettle {
  protected readonly limits = FIELD_LIMITS;
  readonly #queries = inject(QueryService);
  readonly #dialog = inject(MatDialog);
  readonly #fb = inject(NonNullableFormBuilder);

  readonly query = input.required<CellQuery>();
  readonly words = input.required<QueryCellWords>();
  /** another action on this query is under way */
  readonly locked = input(false);
  readonly settled = output<QueryWorked>();
  /** someone else moved the query on meanwhile */
  readonly moved = output();

  protected readonly submission = new FormSubmission();
  readonly busy = this.submission.busy;
  protected readonly form = this.#fb.group({ note: ['', Validators.maxLength(FIELD_LIMITS.queryText.max)] });

  protected confirmSettle(): void {
    const words = this.words();
    this.submission.submit(
      this.form,
      () => this.#queries.settleQuery(this.query().id, this.form.controls.note.value.trim()),
      (query) => this.settled.emit({ query, notice: 'The query is settled; the cell was kept.' }),
      {
        confirm: () =>
          confirmQuery(this.#dialog, {
            title: 'Settle this query?',
            lines: [`${words.speciesName} · ${words.traitLabel} stays “${words.codedNow}”.`, 'The query is settled as kept; the person who raised it is told.'],
            confirm: 'Settle, keep the cell',
          }),
        onError: (error) => {
          if (movedOn(error)) this.moved.emit();
        },
      },
    );
  }
}
