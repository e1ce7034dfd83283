import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal, model, output, signal, untracked } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatDialog } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import type { Cell } from '@shared/engine';
import type { CompiledTrait } from '@shared/engine';
import { cellInBrief, FIELD_LIMITS } from '@shared/engine';
import { type CellQuery, type CellVersion, QueryService, StaleCell } from '../../core/api/query-service';
import { FormSubmission } from '../../core/forms/form-submission';
import { CellEditor } from '../../shared/cell-editor';
import type { CellTrait } from '../../shared/cell-form';
import { confirmQuery } from './confirm-query-dialog';
import { type QueryWorked, movedOn } from './query-worked';
import type { QueryCellWords } from './review-words';

/** The working-matrix cell as read for the recode: read with its version, or not read (the request failed). */
export type WorkingCell = { status: 'loading' } | { status: 'read'; cell: CellVersion } | { status: 'unread' };

function cellTraitOf(trait: CompiledTrait): CellTrait {
  return { kind: trait.kind, values: trait.answerCodes.map((code, index) => ({ code, label: trait.answerLabels[index] ?? '' })), unit: trait.unit };
}

/**
 * A reviewer rewrites the queried cell in the working matrix and settles the query as recoded. The
 * recode names the version of the cell it is based on; when the cell moved on meanwhile, nothing is
 * written and the reviewer chooses what to base the change on.
 */
@Component({
  selector: 'sv-query-recode',
  imports: [ReactiveFormsModule, MatButton, MatFormField, MatLabel, MatHint, MatError, MatInput, CellEditor],
  templateUrl: './query-recode.html',
  styleUrl: './query-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class QueryRecode {
  protected readonly limits = FIELD_LIMITS;
  readonly #queries = inject(QueryService);
  readonly #dialog = inject(MatDialog);
  readonly #fb = inject(NonNullableFormBuilder);

  readonly query = input.required<CellQuery>();
  readonly words = input.required<QueryCellWords>();
  readonly trait = input.required<CompiledTrait>();
  /** the cell as the current edition codes it, where the editor starts */
  readonly editionCell = input.required<Cell | null>();
  /** the cell in the working matrix: the recode is based on its version, and a refusal replaces it */
  readonly working = model.required<WorkingCell>();
  /** another action on this query is under way */
  readonly locked = input(false);
  readonly recoded = output<QueryWorked>();
  /** a sentence for the page's notice line */
  readonly notice = output<string>();
  /** someone else moved the query on meanwhile */
  readonly moved = output();

  protected readonly submission = new FormSubmission();
  readonly busy = this.submission.busy;
  /** the cell as a refused recode found it, until the reviewer re-bases */
  protected readonly stale = signal<CellVersion | null>(null);
  protected readonly tried = signal(false);
  /** the cell in the editor; null while it cannot be written. Starts from the edition's cell, once per query. */
  protected readonly edited = linkedSignal<number, Cell | null>({ source: () => this.query().id, computation: () => untracked(() => this.editionCell()) });
  protected readonly editorTrait = computed(() => cellTraitOf(this.trait()), { equal: (a, b) => JSON.stringify(a) === JSON.stringify(b) });
  /** the version the recode is based on: the one read, or the one a refusal showed */
  protected readonly baseVersion = computed(() => {
    const working = this.working();
    return working.status === 'read' ? working.cell.version : 0;
  });
  protected readonly staleWords = computed(() => {
    const stale = this.stale();
    return stale ? cellInBrief(this.trait(), stale.value) : '';
  });

  protected readonly form = this.#fb.group({
    reason: ['', [Validators.required, Validators.minLength(FIELD_LIMITS.changeReason.min), Validators.maxLength(FIELD_LIMITS.changeReason.max)]],
  });

  constructor() {
    // The form holds the reason; a cell the editor says can be written is its form-level rule (added
    // here rather than at creation, which would read the inputs before they are set).
    this.form.addValidators(() => (this.edited() === null ? { cell: true } : null));
  }

  protected reasonError(): string | null {
    const control = this.form.controls.reason;
    if (control.hasError('required')) return 'Say why the cell changes; it is kept in the audit log.';
    if (control.hasError('minlength')) return 'Write at least 3 characters.';
    if (control.hasError('maxlength')) return 'At most 2000 characters.';
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected confirmRecode(): void {
    this.tried.set(true);
    // the cell rule reads the editor, which is not one of the form's controls: check it now
    this.form.updateValueAndValidity();
    const trait = this.trait();
    const words = this.words();
    const version = this.baseVersion();
    this.submission.submit(
      this.form,
      () => this.#queries.recodeQuery(this.query().id, { value: this.#writableCell(), version, reason: this.form.controls.reason.value.trim() }),
      ({ query, cell }) => {
        this.stale.set(null);
        this.working.set({ status: 'read', cell });
        this.recoded.emit({ query, notice: `The cell is recoded (now version ${cell.version}) and the query is settled.` });
      },
      {
        confirm: () =>
          confirmQuery(this.#dialog, {
            title: 'Recode this cell?',
            lines: [
              `${words.speciesName} · ${words.traitLabel}: “${this.#fromWords()}” becomes “${cellInBrief(trait, this.#writableCell())}”.`,
              'The working matrix changes now and the query is settled as recoded; the sift uses the new value once the next edition is published.',
            ],
            confirm: 'Recode and settle',
          }),
        onError: (error) => {
          if (error instanceof StaleCell) {
            this.stale.set(error.current);
            return true;
          }
          if (movedOn(error)) this.moved.emit();
          return false;
        },
      },
    );
  }

  /** Keeps what the reviewer typed and bases the next recode on the version a refusal showed. */
  protected rebaseKeepingChange(): void {
    const stale = this.stale();
    if (!stale) return;
    this.working.set({ status: 'read', cell: stale });
    this.stale.set(null);
    this.notice.emit(`Your change is now based on version ${stale.version}. Recode again to write it.`);
  }

  /** Replaces the editor's contents with the cell as it is now, keeping the reason. */
  protected rebaseOnCurrent(): void {
    const stale = this.stale();
    if (!stale) return;
    this.edited.set(stale.value);
    this.rebaseKeepingChange();
  }

  /** The edited cell once the form passed its checks (the form's cell rule refuses an unwritable one). */
  #writableCell(): Cell {
    const cell = this.edited();
    if (cell === null) throw new Error('The cell cannot be written yet.');
    return cell;
  }

  /** The cell the recode replaces, as far as this page knows it: the working cell if read, else the published one. */
  #fromWords(): string {
    const working = this.working();
    if (working.status === 'read') return cellInBrief(this.trait(), working.cell.value);
    return this.words().codedNow;
  }
}
