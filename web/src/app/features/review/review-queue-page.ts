import { ChangeDetectionStrategy, Component, computed, effect, inject, input, linkedSignal, signal, untracked } from '@angular/core';
import { Router, RouterLink } from '@angular/router';
import { MatButton, MatAnchor } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { AuthService } from '../../core/auth/auth-service';
import { EditionService } from '../../core/edition/edition-service';
import { type CellQuery, QUERY_STATES, type QueryState, QueryService } from '../../core/api/query-service';
import { readableError } from '../../core/http/api-problem';
import { STATE_LABELS, ageOf, queryCellWords, raiserName, worksSecondLook } from './review-words';

type StateFilter = QueryState | 'all';
type QueueState = { status: 'loading' } | { status: 'ready'; queries: CellQuery[] } | { status: 'error'; message: string };

const FILTERS: ReadonlyArray<{ value: StateFilter; label: string }> = [
  ...QUERY_STATES.map((state) => ({ value: state, label: STATE_LABELS[state] })),
  { value: 'all', label: 'All' },
];

function readFilter(value: string | undefined): StateFilter | null {
  return FILTERS.some((filter) => filter.value === value) ? (value as StateFilter) : null;
}

/**
 * Second look: reviewers and admins work every query, oldest first; anyone else sees the queries
 * they raised and where each one stands.
 */
@Component({
  selector: 'sv-review-queue-page',
  imports: [RouterLink, MatButton, MatAnchor, MatButtonToggleGroup, MatButtonToggle, MatIcon, MatProgressBar],
  templateUrl: './review-queue-page.html',
  styleUrl: './review.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class ReviewQueuePage {
  readonly #queries = inject(QueryService);
  readonly #router = inject(Router);
  protected readonly auth = inject(AuthService);
  protected readonly editions = inject(EditionService);

  /** `?state=` from the URL: open, answered, settled or all */
  readonly state = input<string>();

  protected readonly filters = FILTERS;
  protected readonly stateLabels = STATE_LABELS;
  /** null while the account is still being read */
  protected readonly reviewer = computed(() => {
    const me = this.auth.me();
    return me ? worksSecondLook(me.role) : null;
  });
  protected readonly filter = linkedSignal<StateFilter>(() => readFilter(this.state()) ?? (this.reviewer() === false ? 'all' : 'open'));
  protected readonly queue = signal<QueueState>({ status: 'loading' });

  protected readonly items = computed(() => {
    const queue = this.queue();
    if (queue.status !== 'ready') return [];
    const compiled = this.editions.compiled();
    const now = Date.now();
    return queue.queries.map((query) => ({ query, words: queryCellWords(compiled, query), age: ageOf(query.createdAt, now), raiser: raiserName(query) }));
  });
  protected readonly errorMessage = computed(() => {
    const queue = this.queue();
    return queue.status === 'error' ? queue.message : '';
  });
  protected readonly emptyWords = computed(() => {
    const filter = this.filter();
    if (this.reviewer()) return filter === 'all' ? 'No queries have been raised yet.' : `No ${filter} queries.`;
    return filter === 'all' ? 'You have not raised a query yet.' : `None of your queries is ${filter}.`;
  });

  constructor() {
    effect(() => {
      const filter = this.filter();
      if (this.reviewer() === null) return;
      untracked(() => this.loadQueries(filter));
    });
  }

  protected chooseFilter(value: StateFilter): void {
    this.filter.set(value);
    // the filter lives in the URL, so a view of the queue is a link that can be shared
    void this.#router.navigate([], { queryParams: { state: value }, replaceUrl: true });
  }

  protected loadQueries(filter: StateFilter = this.filter()): void {
    this.queue.set({ status: 'loading' });
    this.#queries.listQueries(filter === 'all' ? {} : { state: filter }).subscribe({
      next: (queries) => this.queue.set({ status: 'ready', queries }),
      error: (error: unknown) => this.queue.set({ status: 'error', message: readableError(error) }),
    });
  }
}
