import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MAT_DIALOG_DATA, type MatDialog, MatDialogActions, MatDialogContent, MatDialogRef, MatDialogTitle } from '@angular/material/dialog';
import { MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import type { Observable } from 'rxjs';
import type { Cell, Trait } from '@shared/engine';
import { FormSubmission } from '../../core/forms/form-submission';
import { CellEditor } from '../../shared/cell-editor';
import type { CellTrait } from '../../shared/cell-form';
import { DeskService, StaleCellEdit } from './desk-service';
import { cellWords } from './grid-model';

export interface CellEditData {
  taxon: { id: string; scientificName: string };
  trait: Trait;
  /** the cell as the grid read it, and the version it was at */
  value: Cell;
  version: number;
  /** told the cell as it is now when a save is refused because it moved on */
  seen?: (current: { value: Cell; version: number }) => void;
}

/** What the dialog closes with after a save: the cell as saved and its new version. */
export interface CellEditResult {
  value: Cell;
  version: number;
}

/**
 * The editor's view of a trait. A count trait lists its labelled counts, or else every count of its
 * range, plus any count the cell already holds; counts are numbers, as cells store them.
 */
function cellTraitOf(trait: Trait, cell: Cell): CellTrait {
  if (trait.kind !== 'count')
    return { kind: trait.kind, values: (trait.values ?? []).map((value) => ({ code: value.code, label: value.label })), unit: trait.unit };
  const labels = new Map((trait.values ?? []).map((value) => [Number(value.code), value.label]));
  const counts = new Set(labels.keys());
  if (counts.size === 0 && trait.countRange) for (let count = trait.countRange.min; count <= trait.countRange.max; count++) counts.add(count);
  if (typeof cell === 'object' && !('low' in cell))
    for (const value of [...(cell.usual ?? []), ...(cell.occasional ?? []), ...(cell.rare ?? [])]) counts.add(Number(value));
  return {
    kind: 'count',
    values: [...counts]
      .filter(Number.isInteger)
      .sort((a, b) => a - b)
      .map((count) => ({ code: count, label: labels.get(count) ?? String(count) })),
  };
}

/**
 * Edits one cell of the working matrix from the Matrix desk grid, with a reason for the audit log.
 * The save names the version read; when someone else saved first, nothing is written and the
 * curator sees their value beside the cell as it is now, then re-bases theirs or takes the current
 * one. What they typed (cell and reason) stays until they choose.
 */
@Component({
  selector: 'sv-cell-edit-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogTitle,
    MatDialogContent,
    MatDialogActions,
    MatButton,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatInput,
    CellEditor,
  ],
  templateUrl: './cell-edit-dialog.html',
  styleUrl: './cell-edit-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CellEditDialog {
  readonly #desk = inject(DeskService);
  readonly #ref = inject<MatDialogRef<CellEditDialog, CellEditResult>>(MatDialogRef);
  readonly #fb = inject(NonNullableFormBuilder);
  protected readonly data = inject<CellEditData>(MAT_DIALOG_DATA);

  protected readonly submission = new FormSubmission();
  protected readonly editorTrait = cellTraitOf(this.data.trait, this.data.value);
  /** the cell in the editor; null while it cannot be written */
  protected readonly edited = signal<Cell | null>(this.data.value);
  /** the version the save is based on */
  protected readonly baseVersion = signal(this.data.version);
  /** the cell as a refused save found it, until the curator chooses */
  protected readonly stale = signal<{ value: Cell; version: number } | null>(null);
  protected readonly tried = signal(false);
  protected readonly readWords = cellWords(this.data.trait, this.data.value);
  protected readonly staleWords = computed(() => {
    const stale = this.stale();
    return stale ? cellWords(this.data.trait, stale.value) : '';
  });
  protected readonly mineWords = computed(() => {
    const cell = this.edited();
    return cell === null ? 'not writable yet' : cellWords(this.data.trait, cell);
  });

  protected readonly form = this.#fb.group({ reason: ['', [Validators.required, Validators.minLength(3), Validators.maxLength(2000)]] });

  constructor() {
    this.form.addValidators(() => (this.edited() === null ? { cell: true } : null));
  }

  protected reasonError(): string | null {
    const control = this.form.controls.reason;
    if (control.hasError('required')) return 'Say why the cell changes; it is kept in the change log.';
    if (control.hasError('minlength')) return 'Write at least 3 characters.';
    if (control.hasError('maxlength')) return 'At most 2000 characters.';
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected save(): void {
    this.tried.set(true);
    this.form.updateValueAndValidity();
    const cell = this.edited();
    this.submission.submit(
      this.form,
      () =>
        this.#desk.setCell(this.data.taxon.id, this.data.trait.code, {
          value: cell as Cell,
          version: this.baseVersion(),
          reason: this.form.controls.reason.value.trim(),
        }),
      (saved) => this.#ref.close({ value: saved.value, version: saved.version }),
      {
        onError: (error) => {
          if (error instanceof StaleCellEdit) {
            this.stale.set(error.current);
            this.data.seen?.(error.current);
            return true;
          }
          return false;
        },
      },
    );
  }

  /** Keeps the curator's value and bases the next save on the version now in the matrix. */
  protected rebase(): void {
    const stale = this.stale();
    if (!stale) return;
    this.baseVersion.set(stale.version);
    this.stale.set(null);
  }

  /** Drops the curator's value for the one now in the matrix (the reason stays). */
  protected takeCurrent(): void {
    const stale = this.stale();
    if (!stale) return;
    this.edited.set(stale.value);
    this.rebase();
  }

  protected cancel(): void {
    this.#ref.close();
  }
}

/** Opens the cell editor; closes with the saved cell, or undefined when cancelled (Escape, Cancel). */
export function openCellEditor(dialog: MatDialog, data: CellEditData): Observable<CellEditResult | undefined> {
  return dialog
    .open<CellEditDialog, CellEditData, CellEditResult>(CellEditDialog, {
      data,
      autoFocus: 'first-tabbable',
      restoreFocus: true,
      width: '640px',
      maxWidth: 'calc(100vw - 24px)',
    })
    .afterClosed();
}
