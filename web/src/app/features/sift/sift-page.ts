import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  type ElementRef,
  computed,
  effect,
  inject,
  input,
  linkedSignal,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { ActivatedRoute, Router } from '@angular/router';
import { MatButtonToggle, MatButtonToggleGroup } from '@angular/material/button-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatProgressBar } from '@angular/material/progress-bar';
import { MatIcon } from '@angular/material/icon';
import { MatButton } from '@angular/material/button';
import { CAUTIONS, commonName, rank, suggest, validateObservations, type Observation, type ObservingSeason } from '@shared/engine';
import { EditionService } from '../../core/edition/edition-service';
import { PageCautions } from '../../core/layout/page-cautions';
import { describeObservation } from '../../shared/matrix-words';
import { EditionStatus } from '../../shared/edition-status';
import { LookAtNext } from './look-at-next';
import { SeenSoFar } from './seen-so-far';
import { Shortlist } from './shortlist';
import { SideBySide } from './side-by-side';
import { type ObservationChange, TraitPicker } from './trait-picker';
import { type SearchPick, TraitSearch } from './trait-search';
import { checkAgain } from './check-again';
import { plural } from './measure-words';
import {
  type SiftQuery,
  addAnswer,
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

function hasSift(query: SiftQuery): boolean {
  return query.o !== undefined || query.season !== undefined || query.leeway !== undefined;
}

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

  /** The last sift saved on this device, read once: a bare /sift offers it rather than restoring it unasked. */
  readonly #lastSift = loadLastSift();
  /** "Continue the last tree" is offered while the URL carries no sift and nothing is picked yet. */
  protected readonly offerLastSift = signal(Boolean(this.#lastSift?.o) && !hasSift(this.#route.snapshot.queryParams as SiftQuery));

  /** The URL's sift; a bare address keeps the season and leeway last used, but no answers. */
  readonly #source = computed<SiftQuery>(() => {
    const fromUrl: SiftQuery = { o: this.o(), season: this.season(), leeway: this.leeway() };
    if (hasSift(fromUrl)) return fromUrl;
    return { season: this.#lastSift?.season, leeway: this.#lastSift?.leeway };
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

  private readonly results = viewChild<ElementRef<HTMLElement>>('results');
  private readonly sideBySidePanel = viewChild<ElementRef<HTMLElement>>('sideBySidePanel');

  /** The shortlist in one line: the leader, its share and how many species remain. */
  protected readonly standing = computed(() => {
    const compiled = this.compiled();
    const ranked = this.outcome()?.ranked;
    if (!compiled || !ranked) return null;
    const count = ranked.totalCandidates ?? ranked.candidates.length;
    const top = ranked.candidates[0];
    if (!top) return { count, leader: null, share: 0 };
    // the ranking holds only the taxa of the matrix it was given
    const taxon = compiled.taxa[compiled.taxonIndexById.get(top.taxonId) ?? 0]!;
    return { count, leader: commonName(taxon), share: Math.round(top.probability * 100) };
  });

  /** What a screen reader hears after each pick (a polite live region). */
  protected readonly announcement = computed(() => {
    const standing = this.standing();
    if (!standing || this.observations().length === 0) return '';
    const species = plural(standing.count, 'species', 'species');
    if (!standing.leader) return `Shortlist: no species within leeway.`;
    return `Shortlist: ${species}; ${standing.leader} leads with ${standing.share} %`;
  });

  /** Check again: the answer the rest of the sift disagrees with, with the ranking without it. */
  protected readonly doubt = computed(() => {
    const compiled = this.compiled();
    if (!compiled) return null;
    const found = checkAgain(compiled, this.accepted().observations, { season: this.siftSeason(), leeway: this.siftLeeway(), limit: 3 });
    if (!found) return null;
    const words = describeObservation(compiled, found.observation);
    // checkAgain() names only taxa of the matrix it was given
    const name = (id: string) => commonName(compiled.taxa[compiled.taxonIndexById.get(id) ?? 0]!);
    return {
      trait: found.observation.trait,
      text: `${words.label}: ${words.value}`,
      share: Math.round(found.disagreeing * 100),
      without: found.without.map((candidate) => `${name(candidate.taxonId)} ${Math.round(candidate.probability * 100)} %`).join(', '),
    };
  });
  protected readonly showWithout = signal(false);

  constructor() {
    // The caution sits beside the shortlist here; the footer need not say it a second time.
    const cautions = inject(PageCautions);
    cautions.identificationShown.set(true);
    inject(DestroyRef).onDestroy(() => cautions.identificationShown.set(false));
    // The sift lives in the URL (shareable, and the back button steps through it) and on the device.
    effect(() => {
      if (!this.compiled()) return;
      const query = siftQueryParams(this.observations(), this.siftSeason(), this.siftLeeway());
      untracked(() => {
        // Until the offer is answered, an empty sift must not overwrite the saved one.
        if (query.o !== undefined || !this.offerLastSift()) saveLastSift(query);
        const current = this.#route.snapshot.queryParams as SiftQuery;
        if (sameQuery(query, current)) return;
        const hadSift = hasSift(current);
        void this.#router.navigate([], {
          relativeTo: this.#route,
          queryParams: { o: query.o ?? null, season: query.season, leeway: query.leeway },
          replaceUrl: !hadSift,
          // The same page with one more answer: the router must not scroll it back to the top.
          scroll: 'manual',
        });
      });
    });
  }

  protected applyChange(change: ObservationChange): void {
    this.offerLastSift.set(false);
    this.showWithout.set(false);
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

  /** A value chosen in the search is an answer: it goes into Seen so far, and its chip is shown. */
  protected jumpTo(pick: SearchPick): void {
    const compiled = this.compiled();
    if (compiled && pick.answer !== undefined) {
      const observation = addAnswer(compiled, this.observations(), pick.trait, pick.answer);
      if (observation) this.applyChange({ trait: pick.trait, observation });
    }
    this.picker()?.reveal(pick.trait, pick.answer);
  }

  protected continueLastSift(): void {
    const last = this.#lastSift;
    const compiled = this.compiled();
    this.offerLastSift.set(false);
    if (!last || !compiled) return;
    this.siftSeason.set(parseSeason(last.season));
    this.siftLeeway.set(parseLeeway(last.leeway));
    this.observations.set(parseObservations(last.o, compiled));
  }

  protected startNewSift(): void {
    this.offerLastSift.set(false);
    saveLastSift(siftQueryParams([], this.siftSeason(), this.siftLeeway()));
  }

  protected removeDoubt(trait: string): void {
    this.removeObservation(trait);
    this.#snackBar.open('Removed. The shortlist is ranked without it.', undefined, { duration: 4000 });
  }

  /** Ticking the second species fills Side by side, which sits below the shortlist: say so, and offer to go there. */
  protected chooseSideBySide(ids: string[]): void {
    const before = this.sideBySide().length;
    this.sideBySide.set(ids);
    if (before < 2 && ids.length >= 2) {
      this.#snackBar
        .open(`Side by side is ready below the shortlist (${ids.length} species).`, 'Show it', { duration: 8000 })
        .onAction()
        .subscribe(() => this.showSideBySide());
    }
  }

  protected showSideBySide(): void {
    const panel = this.sideBySidePanel()?.nativeElement;
    panel?.scrollIntoView({ block: 'start' });
    panel?.querySelector<HTMLElement>('#side-heading')?.focus({ preventScroll: true });
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
