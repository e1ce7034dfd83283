import { ChangeDetectionStrategy, Component, computed, input, output, signal } from '@angular/core';
import Fuse, { type Expression } from 'fuse.js';
import { MatAutocomplete, MatAutocompleteTrigger, MatOption, type MatAutocompleteSelectedEvent } from '@angular/material/autocomplete';
import { MatFormField, MatLabel, MatPrefix } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatIcon } from '@angular/material/icon';
import { answerLabel, PART_LABELS, type CompiledMatrix } from '@shared/engine';

/** One thing the text box can find: a trait, or one value of it. */
export interface SearchEntry {
  key: string;
  trait: string;
  answer?: string | number;
  traitLabel: string;
  label: string;
  definition: string;
  synonyms: string[];
  part: string;
}

export interface SearchPick {
  trait: string;
  answer?: string | number;
}

const KEYS = [
  { name: 'label', weight: 3 },
  { name: 'synonyms', weight: 3 },
  { name: 'traitLabel', weight: 1.5 },
  { name: 'part', weight: 1 },
  { name: 'definition', weight: 1 },
];

export function searchEntries(compiled: CompiledMatrix): SearchEntry[] {
  const entries: SearchEntry[] = [];
  for (const trait of compiled.traits) {
    const part = PART_LABELS[trait.part];
    entries.push({ key: trait.code, trait: trait.code, traitLabel: trait.label, label: trait.label, definition: trait.help ?? '', synonyms: [], part });
    trait.answerCodes.forEach((answer) => {
      const value = trait.values.find((candidate) => candidate.code === String(answer));
      entries.push({
        key: `${trait.code}:${answer}`,
        trait: trait.code,
        answer,
        traitLabel: trait.label,
        label: answerLabel(trait, answer),
        definition: value?.definition ?? '',
        synonyms: value?.synonyms ?? [],
        part,
      });
    });
  }
  return entries;
}

/** Every word must match some field (fuzzily), so "peeling bark" finds the peeling value of bark texture. */
export function searchTraits(fuse: Fuse<SearchEntry>, query: string, limit = 8): SearchEntry[] {
  const words = query
    .toLowerCase()
    .split(/\s+/)
    .filter((word) => word.length > 1);
  if (words.length === 0) return [];
  const expression: Expression = { $and: words.map((word) => ({ $or: KEYS.map((key) => ({ [key.name]: word })) })) };
  return fuse.search(expression, { limit }).map((result) => result.item);
}

@Component({
  selector: 'sv-trait-search',
  imports: [MatAutocomplete, MatAutocompleteTrigger, MatOption, MatFormField, MatLabel, MatPrefix, MatInput, MatIcon],
  template: `
    <mat-form-field appearance="outline" class="search" subscriptSizing="dynamic">
      <mat-label>Find a trait or value</mat-label>
      <mat-icon matPrefix aria-hidden="true">search</mat-icon>
      <input
        #box
        matInput
        type="search"
        name="trait-search"
        autocomplete="off"
        placeholder="e.g. three needles, peeling bark"
        [value]="query()"
        (input)="query.set(box.value)"
        [matAutocomplete]="found"
      />
      <mat-autocomplete #found="matAutocomplete" [displayWith]="blank" (optionSelected)="choose($event)">
        @for (entry of matches(); track entry.key) {
          <mat-option [value]="entry.key">
            @if (entry.answer !== undefined) {
              <span class="found-trait">{{ entry.traitLabel }}:</span> {{ entry.label }}
            } @else {
              <span class="found-trait">{{ entry.part }}:</span> {{ entry.label }}
            }
          </mat-option>
        }
        @if (query().trim().length > 1 && matches().length === 0) {
          <mat-option disabled value="">No trait or value matches “{{ query() }}”</mat-option>
        }
      </mat-autocomplete>
    </mat-form-field>
  `,
  styles: `
    :host {
      display: block;
      min-width: 0;
    }
    .search {
      width: 100%;
    }
    .found-trait {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TraitSearch {
  readonly compiled = input.required<CompiledMatrix>();
  readonly picked = output<SearchPick>();

  protected readonly query = signal('');
  readonly #entries = computed(() => searchEntries(this.compiled()));
  readonly #fuse = computed(() => new Fuse(this.#entries(), { keys: KEYS, threshold: 0.3, ignoreLocation: true, includeScore: true }));
  protected readonly matches = computed(() => searchTraits(this.#fuse(), this.query()));

  /** The box empties once a match is chosen: the chip it jumps to now shows the choice. */
  protected readonly blank = () => '';

  protected choose(event: MatAutocompleteSelectedEvent): void {
    const entry = this.#entries().find((candidate) => candidate.key === event.option.value);
    this.query.set('');
    if (entry) this.picked.emit({ trait: entry.trait, answer: entry.answer });
  }
}
