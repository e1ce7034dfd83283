import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { Router, RouterLink } from '@angular/router';
import { CdkDrag, type CdkDragDrop, CdkDragHandle, CdkDropList, moveItemInArray } from '@angular/cdk/drag-drop';
import { MatFormField, MatLabel, MatError, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatSlideToggle } from '@angular/material/slide-toggle';
import { MatAnchor, MatButton, MatIconButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatSnackBar } from '@angular/material/snack-bar';
import { FIELD_LIMITS, commonName } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { type StudySetDraft, StudyService, type TaxonMatch } from '../../core/api/study-service';
import { ApiProblem, readableError } from '../../core/http/api-problem';
import type { HoldsUnsavedChanges } from '../../core/navigation/unsaved-changes';
import { keepsStudySets, shareLink, studySetId } from './study-words';
import { SpeciesSearch } from './species-search';

/** One species in the list being edited. */
interface ListedSpecies {
  id: string;
  scientificName: string;
  commonNames: string[];
  retired: boolean;
}

const MAX_SPECIES = 200;
const FIELD_NAMES = ['name', 'event', 'eventDate', 'notes'] as const;
type FieldName = (typeof FIELD_NAMES)[number];

/** Makes a new study set (`/study/new`) or changes one (`/study/:id/edit`). */
@Component({
  selector: 'sv-study-set-editor',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    CdkDropList,
    CdkDrag,
    CdkDragHandle,
    MatFormField,
    MatLabel,
    MatError,
    MatHint,
    MatInput,
    MatSlideToggle,
    MatAnchor,
    MatButton,
    MatIconButton,
    MatIcon,
    MatProgressBar,
    SpeciesSearch,
  ],
  templateUrl: './study-set-editor.html',
  styleUrl: './study.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '(window:beforeunload)': 'warnBeforeUnload($event)' },
})
export default class StudySetEditor implements HoldsUnsavedChanges {
  readonly #study = inject(StudyService);
  readonly #router = inject(Router);
  readonly #snackBar = inject(MatSnackBar);
  readonly #fb = inject(NonNullableFormBuilder);
  protected readonly auth = inject(AuthService);

  /** the set's id from `/study/:id/edit`; absent for a new set */
  readonly id = input<string>();

  protected readonly setId = computed(() => studySetId(this.id()));
  protected readonly editing = computed(() => this.id() !== undefined);
  protected readonly keepsSets = computed(() => {
    const me = this.auth.me();
    return me ? keepsStudySets(me.role) : null;
  });

  protected readonly form = this.#fb.group({
    name: ['', [Validators.required, Validators.maxLength(FIELD_LIMITS.studySetName.max)]],
    event: ['', Validators.maxLength(FIELD_LIMITS.studySetEvent.max)],
    eventDate: [''],
    notes: ['', Validators.maxLength(FIELD_LIMITS.studySetNotes.max)],
    shared: [false],
  });
  protected readonly species = signal<ListedSpecies[]>([]);
  /** ids the server refused, with its reason */
  protected readonly speciesProblems = signal<ReadonlyMap<string, string>>(new Map());
  protected readonly speciesMissing = signal(false);
  protected readonly loading = signal(false);
  protected readonly loadProblem = signal<string | null>(null);
  protected readonly saveProblem = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly savedShared = signal<{ id: number; shared: boolean } | null>(null);

  protected readonly listedIds = computed(() => new Set(this.species().map((item) => item.id)));
  protected readonly shareLink = computed(() => {
    const saved = this.savedShared();
    return saved?.shared ? shareLink(saved) : null;
  });

  protected readonly speciesName = commonName;
  protected readonly limits = FIELD_LIMITS;

  readonly unsavedSubject = 'this study set';
  /** the fields and species as last loaded or saved; anything else is an unsaved edit */
  #savedState = this.#currentState();

  #currentState(): string {
    return JSON.stringify([this.form.getRawValue(), this.species().map((item) => item.id)]);
  }

  hasUnsavedChanges(): boolean {
    return this.#currentState() !== this.#savedState;
  }

  /** Closing or reloading the tab with unsaved edits: the browser asks first. */
  protected warnBeforeUnload(event: BeforeUnloadEvent): void {
    if (this.hasUnsavedChanges()) event.preventDefault();
  }

  constructor() {
    effect(() => {
      const id = this.setId();
      if (this.editing() && id !== null && this.keepsSets()) untracked(() => this.#load(id));
      else if (this.editing() && id === null) this.loadProblem.set('There is no study set at this address.');
    });
  }

  #load(id: number): void {
    this.loading.set(true);
    this.loadProblem.set(null);
    this.#study.loadSet(id).subscribe({
      next: ({ set }) => {
        this.loading.set(false);
        this.form.setValue({ name: set.name, event: set.event ?? '', eventDate: set.eventDate ?? '', notes: set.notes ?? '', shared: set.shared });
        this.species.set(set.taxa.map((taxon) => ({ ...taxon })));
        this.savedShared.set({ id: set.id, shared: set.shared });
        this.#savedState = this.#currentState();
      },
      error: (error: unknown) => {
        this.loading.set(false);
        this.loadProblem.set(readableError(error));
      },
    });
  }

  protected addSpecies(match: TaxonMatch): void {
    if (this.listedIds().has(match.id)) return;
    if (this.species().length >= MAX_SPECIES) {
      this.saveProblem.set(`A study set holds at most ${MAX_SPECIES} species.`);
      return;
    }
    this.species.update((list) => [...list, { id: match.id, scientificName: match.scientificName, commonNames: match.commonNames, retired: false }]);
    this.speciesMissing.set(false);
    this.saveProblem.set(null);
  }

  protected removeSpecies(id: string): void {
    const removed = this.species().find((item) => item.id === id);
    this.species.update((list) => list.filter((item) => item.id !== id));
    this.speciesProblems.update((problems) => {
      const next = new Map(problems);
      next.delete(id);
      return next;
    });
    if (removed) this.#snackBar.open(`Removed ${commonName(removed)}.`, undefined, { duration: 3000 });
  }

  protected dropSpecies(event: CdkDragDrop<ListedSpecies[]>): void {
    this.species.update((list) => {
      const next = [...list];
      moveItemInArray(next, event.previousIndex, event.currentIndex);
      return next;
    });
  }

  /** Moves a species up or down one place; the keyboard way to reorder. */
  protected moveSpecies(index: number, step: -1 | 1, button: HTMLElement): void {
    const to = index + step;
    if (to < 0 || to >= this.species().length) return;
    this.species.update((list) => {
      const next = [...list];
      moveItemInArray(next, index, to);
      return next;
    });
    // Keep focus on the same button of the moved species, so repeated presses keep moving it.
    const selector = `[data-species="${this.species()[to].id}"] .${step < 0 ? 'move-up' : 'move-down'}`;
    requestAnimationFrame(() => {
      const target = document.querySelector<HTMLButtonElement>(selector);
      (target && !target.disabled ? target : button.closest('li')?.querySelector<HTMLElement>('button:not([disabled])'))?.focus();
    });
  }

  protected fieldError(field: FieldName): string | null {
    const control = this.form.controls[field];
    if (control.hasError('required')) return 'Give the set a name.';
    if (control.hasError('maxlength')) return `At most ${(control.getError('maxlength') as { requiredLength: number }).requiredLength} characters.`;
    const server = control.getError('server') as string | undefined;
    return server ?? null;
  }

  protected saveSet(): void {
    this.saveProblem.set(null);
    const empty = this.species().length === 0;
    this.speciesMissing.set(empty);
    if (this.form.invalid || empty) {
      this.form.markAllAsTouched();
      this.saveProblem.set(empty ? 'Add at least one species to the set.' : 'Some fields need a look before the set can be saved.');
      return;
    }
    const value = this.form.getRawValue();
    const draft: StudySetDraft = {
      name: value.name.trim(),
      event: value.event.trim() || null,
      eventDate: value.eventDate || null,
      notes: value.notes.trim() || null,
      shared: value.shared,
      taxa: this.species().map((item) => item.id),
    };
    const id = this.setId();
    this.busy.set(true);
    const request = this.editing() && id !== null ? this.#study.changeSet(id, draft) : this.#study.createSet(draft);
    request.subscribe({
      next: (set) => {
        this.busy.set(false);
        this.#savedState = this.#currentState();
        this.#snackBar.open(`Saved “${set.name}”.`, undefined, { duration: 4000 });
        void this.#router.navigate(['/study', set.id]);
      },
      // What was typed stays in the form; the server's reasons are shown beside the fields they name.
      error: (error: unknown) => {
        this.busy.set(false);
        this.#showProblem(error);
      },
    });
  }

  #showProblem(error: unknown): void {
    this.saveProblem.set(`The set was not saved. ${readableError(error)}`);
    if (!(error instanceof ApiProblem)) return;
    for (const field of FIELD_NAMES) {
      const reason = error.reasonFor(field);
      if (reason) {
        const control = this.form.controls[field];
        control.setErrors({ ...(control.errors ?? {}), server: reason });
        control.markAsTouched();
      }
    }
    const refused = new Map<string, string>();
    for (const param of error.invalidParams) {
      const match = /^\/?taxa\/(\d+)$/.exec(param.name);
      const item = match ? this.species()[Number(match[1])] : undefined;
      if (item) refused.set(item.id, param.reason);
    }
    this.speciesProblems.set(refused);
  }
}
