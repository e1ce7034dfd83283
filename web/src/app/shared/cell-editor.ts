import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, model, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { ReactiveFormsModule } from '@angular/forms';
import { MatFormField, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import type { Cell } from '@shared/engine';
import { type CellMode, type CellTrait, FREQUENCIES, RANGE_FIELDS, RANGE_LABELS, buildCellForm, cellFromForm, cellProblem, fillCellForm } from './cell-form';

/**
 * Edits one matrix cell of a trait: coded values with how often each is seen (state and count traits)
 * or a four-number range (numeric traits), or unknown, or inapplicable.
 *
 * `cell` is two-way: set it to show a cell (the editor starts over from it); while the person edits,
 * it holds the cell the editor describes, or `null` while that cannot be written (no value chosen,
 * a range out of order). A new `trait` starts the editor over from the current cell.
 */
@Component({
  selector: 'sv-cell-editor',
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatSuffix, MatInput, MatSelect, MatOption, MatRadioGroup, MatRadioButton],
  templateUrl: './cell-editor.html',
  styleUrl: './cell-editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CellEditor {
  readonly #destroyRef = inject(DestroyRef);

  /** the trait whose cell this is */
  readonly trait = input.required<CellTrait>();
  /** the cell shown; `null` while the edited cell cannot be written */
  readonly cell = model.required<Cell | null>();
  /** the taxon's name, for the legend of the values */
  readonly taxonName = input('the taxon');
  /** say what keeps the cell from being written (set once the person tried to save) */
  readonly showProblems = input(false);

  /** the trait the form was last filled for (declared before the form, whose rule reads it at creation) */
  #filledTrait: CellTrait | null = null;
  /** the last cell this editor put into `cell`, so that only cells set from outside refill it */
  #emitted: Cell | null | undefined = undefined;

  protected readonly frequencies = FREQUENCIES;
  protected readonly rangeFields = RANGE_FIELDS;
  protected readonly rangeLabels = RANGE_LABELS;
  protected readonly form = buildCellForm(() => this.#filledTrait?.kind ?? null);
  protected readonly mode = signal<CellMode>('coded');
  /** the values the frequency controls were made for (they change only when the form is filled) */
  protected readonly values = signal<CellTrait['values']>([]);
  protected readonly unit = computed(() => this.trait().unit ?? 'cm');
  readonly #problem = signal<string | null>(null);
  protected readonly problem = computed(() => (this.showProblems() ? this.#problem() : null));

  constructor() {
    this.form.valueChanges.pipe(takeUntilDestroyed(this.#destroyRef)).subscribe(() => this.#report());
    effect(() => {
      const trait = this.trait();
      const cell = this.cell();
      if (trait === this.#filledTrait && (cell === this.#emitted || cell === null)) return;
      untracked(() => this.#fill(trait, cell ?? (this.#filledTrait ? cellFromForm(this.form, this.#filledTrait) : {})));
    });
    effect(() => {
      if (this.showProblems()) untracked(() => this.form.markAllAsTouched());
    });
  }

  #fill(trait: CellTrait, cell: Cell): void {
    this.#filledTrait = trait;
    this.values.set(trait.kind === 'numeric' ? [] : trait.values);
    fillCellForm(this.form, trait, cell);
    this.#report();
  }

  #report(): void {
    const trait = this.#filledTrait;
    if (!trait) return;
    this.mode.set(this.form.controls.mode.value);
    this.#problem.set(cellProblem(this.form, trait.unit ?? 'cm'));
    const cell = this.form.valid ? cellFromForm(this.form, trait) : null;
    this.#emitted = cell;
    this.cell.set(cell);
  }
}
