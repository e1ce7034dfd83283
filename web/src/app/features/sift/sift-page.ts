import { ChangeDetectionStrategy, Component, type ElementRef, computed, effect, inject, input, linkedSignal, signal, untracked, viewChild } from '@angular/core';
import { ActivatedRoute, Router } from '@angular/router';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatIcon } from '@angular/material/icon';
import { MatButton } from '@angular/material/button';
import { CAUTIONS, commonName, rank, suggest, validateObservations, type Observation, type ObservingSeason } from '@shared/engine';
import { EditionService } from '../../core/edition/edition-service';
import { EditionStatus } from '../../shared/edition-status';
import { LookAtNext } from './look-at-next';
import { SeenSoFar } from './seen-so-far';
import { Shortlist } from './shortlist';
import { SideBySide } from './side-by-side';
import { type ObservationChange, TraitPicker } from './trait-picker';
import { type SearchPick, TraitSearch } from './trait-search';
import {
  type SiftQuery,
  formatObservations,
  loadLastSift,
  parseLeeway,
  parseObservations,
  parseSeason,
  saveLastSift,
  siftQueryParams,
} from './sift-query';

/** How many shortlist and ruled-out entries the engine returns; probabilities still cover every taxon. */
const SHORTLIST_LIMIT = 25;
const SUGGESTION_LIMIT = 5;
/** The User Timing name of one engine run (rank + suggest), read by the performance test. */
export const ENGINE_MEASURE = 'sylvasift:engine';

function sameQuery(a: SiftQuery, b: SiftQuery): boolean {
  return (a.o ?? '') === (b.o ?? '') && (a.season ?? '') === (b.season ?? '') && (a.leeway ?? '') === (b.leeway ?? '');
}

@Component({
  selector: 'sv-sift-page',
  imports: [
    MatButtonToggleGroup,
    MatButtonToggle,
    MatProgressBar,
    MatIcon,
    MatButton,
    EditionStatus,
    TraitSearch,
    TraitPicker,
    SeenSoFar,
    Shortlist,
    LookAtNext,
    SideBySide,
  ],
  templateUrl: './sift-page.html',
  styleUrl: './sift-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class SiftPage {
  readonly #router = inject(Router);
  readonly #route = inject(ActivatedRoute);
  readonly #snackBar = inject(MatSnackBar);
  protected readonly editions = inject(EditionService);

  /** `?o=` observations, `?season=`, `?leeway=` — the sift as a link */
  readonly o = input<string>();
  readonly season = input<string>();
  readonly leeway = input<string>();

  protected readonly caution = CAUTIONS.identification;
  protected readonly picker = viewChild(TraitPicker);
  protected readonly compiled = this.editions.compiled;

  /** The URL's sift, or the last one saved on this device when the URL carries none. */
  readonly #source = computed<SiftQuery>(() => {
    const fromUrl: SiftQuery = { o: this.o(), season: this.season(), leeway: this.leeway() };
    if (fromUrl.o !== undefined || fromUrl.season !== undefined || fromUrl.leeway !== undefined) return fromUrl;
    return untracked(() => loadLastSift()) ?? fromUrl;
  });

  protected readonly observations = linkedSignal<Observation[]>(
    () => {
      const compiled = this.compiled();
      return compiled ? parseObservations(this.#source().o, compiled) : [];
    },
    // The URL echoing back what was just chosen is the same sift: do not rank it twice.
    { equal: (a, b) => formatObservations(a) === formatObservations(b) },
  );
  protected readonly siftSeason = linkedSignal<ObservingSeason>(() => parseSeason(this.#source().season));
  protected readonly siftLeeway = linkedSignal<number>(() => parseLeeway(this.#source().leeway));
  protected readonly sideBySide = signal<string[]>([]);

  /** Observations the engine accepts; anything it would refuse is set aside and said so, never thrown. */
  protected readonly accepted = computed(() => {
    const compiled = this.compiled();
    const observations = this.observations();
    if (!compiled) return { observations: [], refused: [] };
    const problems = validateObservations(compiled, observations);
    const refusedAt = new Set(problems.map((problem) => problem.index));
    return { observations: observations.filter((_, index) => !refusedAt.has(index)), refused: problems.map((problem) => problem.message) };
  });

  protected readonly outcome = computed(() => {
    const compiled = this.compiled();
    if (!compiled) return null;
    const observations = this.accepted().observations;
    const season = this.siftSeason();
    const leeway = this.siftLeeway();
    const started = performance.now();
    const ranked = rank(compiled, observations, { season, leeway, limit: SHORTLIST_LIMIT });
    const suggestions = suggest(compiled, observations, { season, leeway, limit: SUGGESTION_LIMIT });
    performance.measure(ENGINE_MEASURE, { start: started, end: performance.now() });
    return { ranked, suggestions };
  });

  protected readonly skipped = computed(() => this.outcome()?.ranked.skipped ?? []);

  /** The first three of the shortlist in a line, for narrow screens where the list sits far below. */
  protected readonly leaders = computed(() => {
    const compiled = this.compiled();
    const outcome = this.outcome();
    if (!compiled || !outcome || this.observations().length === 0) return null;
    const top = outcome.ranked.candidates.slice(0, 3).map((candidate) => {
      const taxon = compiled.taxa[compiled.taxonIndexById.get(candidate.taxonId) ?? 0];
      return `${commonName(taxon)} ${Math.round(candidate.probability * 100)}%`;
    });
    return top.length > 0 ? top.join(' · ') : null;
  });
  private readonly results = viewChild<ElementRef<HTMLElement>>('results');

  constructor() {
    // The sift lives in the URL (shareable, and the back button steps through it) and on the device.
    effect(() => {
      if (!this.compiled()) return;
      const query = siftQueryParams(this.observations(), this.siftSeason(), this.siftLeeway());
      saveLastSift(query);
      untracked(() => {
        const current = this.#route.snapshot.queryParams as SiftQuery;
        if (sameQuery(query, current)) return;
        const hadSift = current.o !== undefined || current.season !== undefined || current.leeway !== undefined;
        void this.#router.navigate([], {
          relativeTo: this.#route,
          queryParams: { o: query.o ?? null, season: query.season, leeway: query.leeway },
          replaceUrl: !hadSift,
        });
      });
    });
  }

  protected applyChange(change: ObservationChange): void {
    this.observations.update((observations) => {
      const index = observations.findIndex((observation) => observation.trait === change.trait);
      if (!change.observation) return observations.filter((observation) => observation.trait !== change.trait);
      if (index < 0) return [...observations, change.observation];
      return observations.map((observation, i) => (i === index ? (change.observation as Observation) : observation));
    });
  }

  protected removeObservation(trait: string): void {
    this.applyChange({ trait, observation: null });
  }

  protected clearAll(): void {
    const previous = this.observations();
    if (previous.length === 0) return;
    this.observations.set([]);
    this.#snackBar
      .open(`Cleared ${previous.length} ${previous.length === 1 ? 'observation' : 'observations'}.`, 'Undo', { duration: 8000 })
      .onAction()
      .subscribe(() => this.observations.set(previous));
  }

  protected setSeason(value: unknown): void {
    if (value === 'leaf-on' || value === 'leaf-off') this.siftSeason.set(value);
  }

  protected jumpTo(pick: SearchPick): void {
    this.picker()?.reveal(pick.trait, pick.answer);
  }

  protected lookAt(trait: string): void {
    this.picker()?.reveal(trait);
  }

  protected showShortlist(): void {
    const results = this.results()?.nativeElement;
    results?.scrollIntoView({ block: 'start' });
    results?.querySelector<HTMLElement>('#shortlist-heading')?.focus();
  }
}
