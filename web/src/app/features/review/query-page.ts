import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { RouterLink } from '@angular/router';
import { type AbstractControl, FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatDialog } from '@angular/material/dialog';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatError, MatFormField, MatHint, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatIcon } from '@angular/material/icon';
import { MatOption, MatSelect } from '@angular/material/select';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatRadioButton, MatRadioGroup } from '@angular/material/radio';
import { cellInBrief, cellOf, FIELD_LIMITS, type Cell, type CompiledTrait } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { EditionService } from '../../core/edition/edition-service';
import { type CellQuery, type CellVersion, QueryService, StaleCell } from '../../core/api/query-service';
import { ApiProblem, readableError } from '../../core/http/api-problem';
import { ConfirmQueryDialog, type ConfirmQueryData } from './confirm-query-dialog';
import { FREQUENCIES, RANGE_FIELDS, RANGE_LABELS, buildCellForm, cellFromForm, cellProblem, fillCellForm } from './cell-form';
import { STATE_LABELS, actionWords, ageOf, outcomeWords, queryCellWords, raiserName, whenOf, worksSecondLook } from './review-words';

type PageState = { status: 'loading' } | { status: 'ready'; query: CellQuery } | { status: 'error'; message: string; notFound: boolean };
/** The working-matrix cell as read for the recode: read with its version, or not read (the request failed). */
type WorkingCell = { status: 'loading' } | { status: 'read'; cell: CellVersion } | { status: 'unread' };

/** One query: the cell in words, its history, and for reviewers: answer, settle or recode. */
@Component({
  selector: 'sv-query-page',
  imports: [
    RouterLink,
    ReactiveFormsModule,
    MatAnchor,
    MatButton,
    MatFormField,
    MatLabel,
    MatHint,
    MatError,
    MatInput,
    MatIcon,
    MatSelect,
    MatOption,
    MatProgressBar,
    MatRadioGroup,
    MatRadioButton,
  ],
  templateUrl: './query-page.html',
  styleUrl: './review.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class QueryPage {
  readonly #queries = inject(QueryService);
  readonly #dialog = inject(MatDialog);
  readonly #fb = inject(NonNullableFormBuilder);
  protected readonly auth = inject(AuthService);
  protected readonly editions = inject(EditionService);

  /** the query id from `/review/:id` */
  readonly id = input.required<string>();

  protected readonly stateLabels = STATE_LABELS;
  protected readonly limits = FIELD_LIMITS;
  protected readonly frequencies = FREQUENCIES;
  protected readonly rangeFields = RANGE_FIELDS;
  protected readonly rangeLabels = RANGE_LABELS;
  protected readonly actionWords = actionWords;
  protected readonly whenOf = whenOf;

  protected readonly page = signal<PageState>({ status: 'loading' });
  protected readonly working = signal<WorkingCell>({ status: 'loading' });
  /** the version the recode is based on: the one read, or the one a 409 showed */
  protected readonly baseVersion = signal(0);
  /** the cell as a refused recode found it, until the reviewer re-bases */
  protected readonly stale = signal<CellVersion | null>(null);
  protected readonly busy = signal<'answer' | 'settle' | 'recode' | null>(null);
  protected readonly problem = signal<{ action: 'answer' | 'settle' | 'recode'; message: string } | null>(null);
  protected readonly done = signal('');
  protected readonly recodeTried = signal(false);

  protected readonly reviewer = computed(() => worksSecondLook(this.auth.me()?.role));
  protected readonly query = computed(() => {
    const page = this.page();
    return page.status === 'ready' ? page.query : null;
  });
  protected readonly words = computed(() => {
    const query = this.query();
    return query ? queryCellWords(this.editions.compiled(), query) : null;
  });
  protected readonly trait = computed(() => this.words()?.trait ?? null);
  protected readonly editionCell = computed((): Cell | null => {
    const compiled = this.editions.compiled();
    const query = this.query();
    const words = this.words();
    if (!compiled || !query || !words?.trait || !compiled.taxonIndexById.has(query.taxonId)) return null;
    return cellOf(compiled, query.taxonId, query.traitCode);
  });
  protected readonly age = computed(() => {
    const query = this.query();
    return query ? ageOf(query.createdAt) : '';
  });
  protected readonly raiser = computed(() => {
    const query = this.query();
    return query ? raiserName(query) : '';
  });
  protected readonly outcome = computed(() => {
    const query = this.query();
    return query ? outcomeWords(query) : '';
  });
  /** the working cell, when it was read and differs from the published edition */
  protected readonly workingDiffers = computed(() => {
    const working = this.working();
    const trait = this.trait();
    const cell = this.editionCell();
    if (working.status !== 'read' || !trait || cell === null) return null;
    const words = cellInBrief(trait, working.cell.value);
    return words === cellInBrief(trait, cell) ? null : words;
  });
  protected readonly staleWords = computed(() => {
    const stale = this.stale();
    const trait = this.trait();
    return stale && trait ? cellInBrief(trait, stale.value) : '';
  });

  /** the answer form's directive: resetting through it also forgets that the form was submitted */
  private readonly answerFormDirective = viewChild('answerFormDirective', { read: FormGroupDirective });
  protected readonly answerForm = this.#fb.group({
    answer: ['', [Validators.required, Validators.minLength(FIELD_LIMITS.queryText.min), Validators.maxLength(FIELD_LIMITS.queryText.max)]],
    evidence: ['', Validators.maxLength(FIELD_LIMITS.queryText.max)],
  });
  protected readonly settleForm = this.#fb.group({ note: ['', Validators.maxLength(FIELD_LIMITS.queryText.max)] });
  protected readonly recodeForm = buildCellForm(() => this.trait()?.kind ?? null);
  protected readonly recodeMode = signal(this.recodeForm.controls.mode.value);

  constructor() {
    effect(() => {
      const id = this.id();
      untracked(() => this.loadQuery(id));
    });
    // The editor starts from the cell as published; it is set up once the query and its trait are known.
    let filledFor = '';
    effect(() => {
      const trait = this.trait();
      const cell = this.editionCell();
      const query = this.query();
      if (!trait || cell === null || !query || filledFor === `${query.id}`) return;
      filledFor = `${query.id}`;
      untracked(() => {
        fillCellForm(this.recodeForm, trait, cell);
        this.recodeMode.set(this.recodeForm.controls.mode.value);
      });
    });
    this.recodeForm.controls.mode.valueChanges.subscribe((mode) => this.recodeMode.set(mode));
  }

  protected loadQuery(id = this.id()): void {
    this.page.set({ status: 'loading' });
    this.#queries.getQuery(Number(id)).subscribe({
      next: (query) => {
        this.page.set({ status: 'ready', query });
        if (this.reviewer() && query.state !== 'settled') this.#readWorkingCell(query);
      },
      error: (error: unknown) =>
        this.page.set({ status: 'error', message: readableError(error), notFound: error instanceof ApiProblem && (error.status === 404 || error.status === 400) }),
    });
  }

  /** Reads the working cell and its version; if that fails, the first recode checks the version instead. */
  #readWorkingCell(query: CellQuery): void {
    this.working.set({ status: 'loading' });
    this.#queries.workingCell(query.id).subscribe({
      next: (cell) => {
        this.working.set({ status: 'read', cell });
        this.baseVersion.set(cell.version);
      },
      error: () => {
        this.working.set({ status: 'unread' });
        this.baseVersion.set(0);
      },
    });
  }

  protected answerError(field: 'answer' | 'evidence'): string | null {
    const control = this.answerForm.controls[field];
    if (control.hasError('required')) return 'Write the answer.';
    if (control.hasError('minlength')) return `Write at least ${FIELD_LIMITS.queryText.min} characters.`;
    if (control.hasError('maxlength')) return `At most ${FIELD_LIMITS.queryText.max} characters.`;
    return (control.getError('server') as string | undefined) ?? null;
  }

  protected recodeReasonError(): string | null {
    const control = this.recodeForm.controls.reason;
    if (control.hasError('required')) return 'Say why the cell changes; it is kept in the audit log.';
    if (control.hasError('minlength')) return `Write at least ${FIELD_LIMITS.changeReason.min} characters.`;
    if (control.hasError('maxlength')) return `At most ${FIELD_LIMITS.changeReason.max} characters.`;
    return (control.getError('server') as string | undefined) ?? null;
  }

  /** What keeps the cell from being written, once a recode was tried (the form is not a signal, so this is read on each check). */
  protected recodeCellProblem(): string | null {
    return this.recodeTried() ? cellProblem(this.recodeForm) : null;
  }

  protected answerQuery(): void {
    const query = this.query();
    if (!query) return;
    this.problem.set(null);
    if (this.answerForm.invalid) {
      this.answerForm.markAllAsTouched();
      return;
    }
    const { answer, evidence } = this.answerForm.getRawValue();
    this.busy.set('answer');
    this.#queries.answerQuery(query.id, answer.trim(), evidence.trim()).subscribe({
      next: (answered) => {
        this.busy.set(null);
        this.page.set({ status: 'ready', query: answered });
        this.answerFormDirective()?.resetForm();
        this.done.set('Your answer is saved; the query is answered.');
      },
      error: (error: unknown) => this.#failed('answer', error),
    });
  }

  protected confirmSettle(): void {
    const query = this.query();
    const words = this.words();
    if (!query || !words) return;
    this.problem.set(null);
    if (this.settleForm.invalid) {
      this.settleForm.markAllAsTouched();
      return;
    }
    this.#confirm({
      title: 'Settle this query?',
      lines: [`${words.speciesName} · ${words.traitLabel} stays “${words.codedNow}”.`, 'The query is settled as kept; the person who raised it is told.'],
      confirm: 'Settle, keep the cell',
    }).subscribe((confirmed) => {
      if (confirmed !== true) return;
      this.busy.set('settle');
      this.#queries.settleQuery(query.id, this.settleForm.controls.note.value.trim()).subscribe({
        next: (settled) => {
          this.busy.set(null);
          this.page.set({ status: 'ready', query: settled });
          this.done.set('The query is settled; the cell was kept.');
        },
        error: (error: unknown) => this.#failed('settle', error),
      });
    });
  }

  protected confirmRecode(): void {
    const query = this.query();
    const words = this.words();
    const trait = this.trait();
    if (!query || !words || !trait) return;
    this.problem.set(null);
    this.recodeTried.set(true);
    this.recodeMode.set(this.recodeForm.controls.mode.value);
    if (this.recodeForm.invalid) {
      this.recodeForm.markAllAsTouched();
      return;
    }
    const value = cellFromForm(this.recodeForm, trait);
    const reason = this.recodeForm.controls.reason.value.trim();
    const version = this.baseVersion();
    this.#confirm({
      title: 'Recode this cell?',
      lines: [
        `${words.speciesName} · ${words.traitLabel}: “${this.#fromWords(trait)}” becomes “${cellInBrief(trait, value)}”.`,
        'The working matrix changes now and the query is settled as recoded; the sift uses the new value once the next edition is published.',
      ],
      confirm: 'Recode and settle',
    }).subscribe((confirmed) => {
      if (confirmed !== true) return;
      this.busy.set('recode');
      this.#queries.recodeQuery(query.id, { value, version, reason }).subscribe({
        next: ({ query: recoded, cell }) => {
          this.busy.set(null);
          this.stale.set(null);
          this.page.set({ status: 'ready', query: recoded });
          this.working.set({ status: 'read', cell });
          this.done.set(`The cell is recoded (now version ${cell.version}) and the query is settled.`);
        },
        error: (error: unknown) => {
          if (error instanceof StaleCell) {
            this.busy.set(null);
            this.stale.set(error.current);
            return;
          }
          this.#failed('recode', error);
        },
      });
    });
  }

  /** Keeps what the reviewer typed and bases the next recode on the version a 409 showed. */
  protected rebaseKeepingChange(): void {
    const stale = this.stale();
    if (!stale) return;
    this.baseVersion.set(stale.version);
    this.working.set({ status: 'read', cell: stale });
    this.stale.set(null);
    this.done.set(`Your change is now based on version ${stale.version}. Recode again to write it.`);
  }

  /** Replaces the editor's contents with the cell as it is now, keeping the reason. */
  protected rebaseOnCurrent(): void {
    const stale = this.stale();
    const trait = this.trait();
    if (!stale || !trait) return;
    fillCellForm(this.recodeForm, trait, stale.value);
    this.recodeMode.set(this.recodeForm.controls.mode.value);
    this.rebaseKeepingChange();
  }

  /** The cell the recode replaces, as far as this page knows it: the working cell if read, else the published one. */
  #fromWords(trait: CompiledTrait): string {
    const working = this.working();
    if (working.status === 'read') return cellInBrief(trait, working.cell.value);
    return this.words()?.codedNow ?? '';
  }

  #confirm(data: ConfirmQueryData) {
    return this.#dialog
      .open<ConfirmQueryDialog, ConfirmQueryData, boolean>(ConfirmQueryDialog, { data, autoFocus: 'first-tabbable', restoreFocus: true, maxWidth: '560px' })
      .afterClosed();
  }

  #failed(action: 'answer' | 'settle' | 'recode', error: unknown): void {
    this.busy.set(null);
    if (error instanceof ApiProblem) {
      const form: AbstractControl | null = action === 'answer' ? this.answerForm : action === 'recode' ? this.recodeForm : null;
      for (const field of ['answer', 'evidence', 'reason']) {
        const reason = error.reasonFor(field);
        const control = form?.get(field);
        if (reason && control) {
          control.setErrors({ server: reason });
          control.markAsTouched();
        }
      }
      // a 409 here means someone else moved the query on; show it as it is now
      if (error.status === 409) this.#refresh();
    }
    this.problem.set({ action, message: readableError(error) });
  }

  #refresh(): void {
    const query = this.query();
    if (!query) return;
    this.#queries.getQuery(query.id).subscribe({ next: (fresh) => this.page.set({ status: 'ready', query: fresh }), error: () => undefined });
  }
}
