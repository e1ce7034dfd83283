import { ChangeDetectionStrategy, Component, computed, inject, input, output, viewChild } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatAutocomplete, MatAutocompleteTrigger, MatOption, type MatAutocompleteSelectedEvent } from '@angular/material/autocomplete';
import { MatFormField, MatHint, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatIcon } from '@angular/material/icon';
import { catchError, distinctUntilChanged, map, of, startWith, switchMap, timer } from 'rxjs';
import { commonName } from '@shared/engine';
import { StudyService, type TaxonMatch } from '../../core/api/study-service';
import { readableError } from '../../core/http/api-problem';
import { rankMatches } from './species-ranking';

type SearchState =
  { status: 'idle' } | { status: 'searching' } | { status: 'done'; matches: TaxonMatch[]; clearBest: boolean } | { status: 'error'; message: string };

/** Finds a species of the current edition by common or scientific name and hands the one picked on. */
@Component({
  selector: 'sv-species-search',
  imports: [ReactiveFormsModule, MatAutocomplete, MatAutocompleteTrigger, MatOption, MatFormField, MatLabel, MatHint, MatPrefix, MatInput, MatIcon],
  template: `
    <mat-form-field appearance="outline" class="search-field" subscriptSizing="dynamic">
      <mat-icon matPrefix aria-hidden="true">search</mat-icon>
      <mat-label>Add a species by name</mat-label>
      <input
        matInput
        type="search"
        [formControl]="search"
        [matAutocomplete]="speciesOptions"
        autocomplete="off"
        aria-describedby="search-hint"
        (keydown.enter)="openListOnEnter()"
      />
      <mat-hint id="search-hint">Common or scientific name; small typos are fine</mat-hint>
    </mat-form-field>
    <mat-autocomplete #speciesOptions="matAutocomplete" [autoActiveFirstOption]="clearBest()" [displayWith]="displayNothing" (optionSelected)="pick($event)">
      @for (match of matches(); track match.id) {
        <mat-option [value]="match" [disabled]="listed().has(match.id)">
          <span class="option-name">{{ speciesName(match) }}</span>
          <span class="sci">{{ match.scientificName }}</span>
          @if (listed().has(match.id)) {
            <span class="option-note">in the set</span>
          }
        </mat-option>
      }
    </mat-autocomplete>
    @switch (searchState().status) {
      @case ('searching') {
        <p class="hint" role="status">Searching…</p>
      }
      @case ('error') {
        @if (searchState(); as state) {
          @if (state.status === 'error') {
            <p class="problem small" role="alert">The species search failed. {{ state.message }}</p>
          }
        }
      }
      @case ('done') {
        @if (matches().length === 0) {
          <p class="hint" role="status">No species of the current edition matches that name.</p>
        }
      }
    }
  `,
  styles: `
    @use '../../shared/page-parts';

    :host {
      display: block;
    }

    .search-field {
      width: 100%;
    }

    .option-name {
      margin-right: 6px;
    }

    .option-note {
      margin-left: 6px;
      font: var(--mat-sys-label-small);
    }

    .hint {
      color: var(--mat-sys-on-surface-variant);
      font: var(--mat-sys-body-medium);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SpeciesSearch {
  readonly #study = inject(StudyService);

  /** ids already chosen: still found, but not picked again */
  readonly listed = input<ReadonlySet<string>>(new Set());
  /** a species the person picked from the matches */
  readonly picked = output<TaxonMatch>();

  protected readonly search = new FormControl<string | TaxonMatch>('', { nonNullable: true });
  protected readonly searchState = toSignal(
    this.search.valueChanges.pipe(
      map((value) => (typeof value === 'string' ? value.trim() : '')),
      distinctUntilChanged(),
      // The last words' matches go at once (so Enter cannot pick one of them for the new words);
      // the search itself waits for a pause in the typing.
      switchMap((words) =>
        words.length < 2
          ? of<SearchState>({ status: 'idle' })
          : timer(200).pipe(
              switchMap(() => this.#study.searchSpecies(words)),
              map((matches): SearchState => ({ status: 'done', ...rankMatches(words, matches) })),
              catchError((error: unknown) => of<SearchState>({ status: 'error', message: readableError(error) })),
              startWith<SearchState>({ status: 'searching' }),
            ),
      ),
    ),
    { initialValue: { status: 'idle' } as SearchState },
  );
  protected readonly matches = computed(() => {
    const state = this.searchState();
    return state.status === 'done' ? state.matches : [];
  });

  /** Enter adds the first match only when it clearly is the one meant; otherwise it shows the list. */
  protected readonly clearBest = computed(() => {
    const state = this.searchState();
    return state.status === 'done' && state.clearBest;
  });
  private readonly trigger = viewChild.required(MatAutocompleteTrigger);

  protected readonly speciesName = commonName;
  protected readonly displayNothing = () => '';

  protected openListOnEnter(): void {
    if (!this.trigger().panelOpen && this.matches().length > 0) this.trigger().openPanel();
  }

  protected pick(event: MatAutocompleteSelectedEvent): void {
    const match = event.option.value as TaxonMatch;
    this.search.setValue('');
    this.picked.emit(match);
  }
}
