import { ChangeDetectionStrategy, Component, computed, inject, input, linkedSignal, signal, viewChild } from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { RouterLink } from '@angular/router';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { EMPTY, Subject, catchError, combineLatest, map, of, startWith, switchMap } from 'rxjs';
import type { Cell } from '@shared/engine';
import { cellOf, cellInBrief } from '@shared/engine';
import { AuthService } from '../../core/auth/auth-service';
import { EditionService } from '../../core/edition/edition-service';
import { type CellQuery, QueryService } from '../../core/api/query-service';
import { ApiProblem, readableError } from '../../core/http/api-problem';
import { QueryAnswerForm } from './query-answer-form';
import { QuerySettle } from './query-settle';
import { QueryRecode, type WorkingCell } from './query-recode';
import type { QueryWorked } from './query-worked';
import { STATE_LABELS, actionWords, ageOf, outcomeWords, queryCellWords, raiserName, whenOf, worksSecondLook } from './review-words';

type PageState = { status: 'loading' } | { status: 'ready'; query: CellQuery } | { status: 'error'; message: string; notFound: boolean };

const LOADING = { status: 'loading' } as const;

/** One query: the cell in words, its history, and for reviewers: answer, settle or recode. */
@Component({
  selector: 'sv-query-page',
  imports: [RouterLink, MatAnchor, MatButton, MatIcon, MatProgressBar, QueryAnswerForm, QuerySettle, QueryRecode],
  templateUrl: './query-page.html',
  styleUrl: './review.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class QueryPage {
  readonly #queries = inject(QueryService);
  protected readonly auth = inject(AuthService);
  protected readonly editions = inject(EditionService);

  /** the query id from `/review/:id` */
  readonly id = input.required<string>();

  protected readonly stateLabels = STATE_LABELS;
  protected readonly actionWords = actionWords;
  protected readonly whenOf = whenOf;

  /** "Try again" after a failed load */
  readonly #reload = new Subject<void>();
  /** someone else moved the query on: show it as it is now, without a loading state */
  readonly #refresh = new Subject<void>();
  /** the query as loaded for the id in the address, again on each retry */
  readonly #loaded = toSignal(
    combineLatest([toObservable(this.id), this.#reload.pipe(startWith(undefined))]).pipe(
      switchMap(([id]) =>
        this.#queries.getQuery(Number(id)).pipe(
          map((query): PageState => ({ status: 'ready', query })),
          catchError((error: unknown) =>
            of<PageState>({
              status: 'error',
              message: readableError(error),
              notFound: error instanceof ApiProblem && (error.status === 404 || error.status === 400),
            }),
          ),
          startWith<PageState>(LOADING),
        ),
      ),
    ),
    { initialValue: LOADING as PageState },
  );
  /** the page: the query as loaded, then as each reviewer action left it */
  protected readonly page = linkedSignal(() => this.#loaded());
  protected readonly done = signal('');

  protected readonly reviewer = computed(() => worksSecondLook(this.auth.me()?.role));
  protected readonly query = computed(() => {
    const page = this.page();
    return page.status === 'ready' ? page.query : null;
  });

  /** a freshly loaded query a reviewer may still recode: its working-matrix cell is read for it */
  readonly #recodable = computed(() => {
    const loaded = this.#loaded();
    return loaded.status === 'ready' && this.reviewer() && loaded.query.state !== 'settled' ? loaded.query : null;
  });
  readonly #workingRead = toSignal(
    toObservable(this.#recodable).pipe(
      switchMap((query) =>
        query
          ? this.#queries.workingCell(query.id).pipe(
              map((cell): WorkingCell => ({ status: 'read', cell })),
              // if that fails, the first recode checks the version instead
              catchError(() => of<WorkingCell>({ status: 'unread' })),
              startWith<WorkingCell>(LOADING),
            )
          : of<WorkingCell>(LOADING),
      ),
    ),
    { initialValue: LOADING as WorkingCell },
  );
  /** the working-matrix cell: as read, then as a recode or a refused recode showed it */
  protected readonly working = linkedSignal(() => this.#workingRead());

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

  private readonly answerForm = viewChild(QueryAnswerForm);
  private readonly settle = viewChild(QuerySettle);
  private readonly recode = viewChild(QueryRecode);
  /** one action at a time: while one is out, the others wait */
  protected readonly acting = computed(() => Boolean(this.answerForm()?.busy() || this.settle()?.busy() || this.recode()?.busy()));

  constructor() {
    this.#refresh
      .pipe(
        switchMap(() => {
          const query = this.query();
          return query ? this.#queries.getQuery(query.id).pipe(catchError(() => EMPTY)) : EMPTY;
        }),
        takeUntilDestroyed(),
      )
      .subscribe((fresh) => this.page.set({ status: 'ready', query: fresh }));
  }

  protected loadQuery(): void {
    this.#reload.next();
  }

  protected refresh(): void {
    this.#refresh.next();
  }

  protected showWorked({ query, notice }: QueryWorked): void {
    this.page.set({ status: 'ready', query });
    this.done.set(notice);
  }
}
