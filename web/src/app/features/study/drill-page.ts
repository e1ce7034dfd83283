import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  Injector,
  afterNextRender,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { RouterLink } from '@angular/router';
import { MatAnchor, MatButton } from '@angular/material/button';
import { MatFormField, MatLabel, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { MatIcon } from '@angular/material/icon';
import { MatProgressBar } from '@angular/material/progress-bar';
import { CAUTIONS, seededRandom } from '@shared/engine';
import { EditionService } from '../../core/edition/edition-service';
import { EditionStatus } from '../../shared/edition-status';
import { type Difference, type DrillChoice, type DrillQuestion, askableIds, differences, drillQuestions, nameMatcher } from './drill';
import { loadStudySet } from './study-set-loader';
import { idsInEdition, nameOf } from './study-sheet';

interface Answered {
  question: DrillQuestion;
  picked: DrillChoice;
  correct: boolean;
  /** how the pick differs from the answer, when wrong */
  differences: Difference[];
}

interface Round {
  kind: 'whole set' | 'missed';
  questions: DrillQuestion[];
  answered: Answered[];
}

function seedFrom(text: string | undefined): number {
  const seed = Number(text);
  return Number.isInteger(seed) && seed >= 0 ? seed : Math.floor(Math.random() * 2 ** 31);
}

/**
 * Drills from a study set (`/study/:id/drill`, `?seed=` for a fixed order): each question shows
 * what sets one species apart from the rest of the set; the learner names it from up to four choices
 * or by typing. Works offline once the edition and the set have been downloaded.
 */
@Component({
  selector: 'sv-drill-page',
  imports: [RouterLink, MatAnchor, MatButton, MatFormField, MatLabel, MatHint, MatInput, MatIcon, MatProgressBar, EditionStatus],
  templateUrl: './drill-page.html',
  styleUrl: './drill-page.scss',
  host: { '(document:keydown)': 'answerByKey($event)' },
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export default class DrillPage {
  readonly #injector = inject(Injector);
  protected readonly editions = inject(EditionService);

  /** the set's id from `/study/:id/drill` */
  readonly id = input<string>();
  /** `?seed=`: the same seed asks the same questions in the same order */
  readonly seed = input<string>();

  protected readonly loaded = loadStudySet(this.id);
  protected readonly set = this.loaded.set;
  protected readonly useCaution = CAUTIONS.use;
  protected readonly identificationCaution = CAUTIONS.identification;

  readonly #random = computed(() => seededRandom(seedFrom(this.seed())));
  protected readonly setIds = computed(() => {
    const compiled = this.editions.compiled();
    const set = this.set();
    return compiled && set
      ? idsInEdition(
          compiled,
          set.taxa.map((taxon) => taxon.id),
        )
      : [];
  });
  protected readonly askable = computed(() => {
    const compiled = this.editions.compiled();
    return compiled ? askableIds(compiled, this.setIds()) : [];
  });
  /** species of the set the drill cannot ask for: not in the edition, or told apart by nothing coded */
  protected readonly leftOut = computed(() => {
    const compiled = this.editions.compiled();
    const set = this.set();
    if (!compiled || !set) return [];
    const askable = new Set(this.askable());
    return set.taxa.filter((taxon) => !askable.has(taxon.id)).map((taxon) => nameOf(compiled, taxon.id));
  });
  readonly #matchName = computed(() => {
    const compiled = this.editions.compiled();
    return compiled ? nameMatcher(compiled, this.setIds()) : null;
  });

  protected readonly round = signal<Round | null>(null);
  protected readonly typed = signal('');
  protected readonly typedProblem = signal<string | null>(null);

  protected readonly position = computed(() => this.round()?.answered.length ?? 0);
  /** the question on screen: unanswered, or just answered and showing its feedback */
  protected readonly current = computed<DrillQuestion | null>(() => {
    const round = this.round();
    if (!round) return null;
    const feedback = this.feedback();
    return feedback ? feedback.question : (round.questions[round.answered.length] ?? null);
  });
  /** the last answer, shown until the learner moves on */
  protected readonly feedback = signal<Answered | null>(null);
  protected readonly finished = computed(() => {
    const round = this.round();
    return !!round && !this.feedback() && round.answered.length >= round.questions.length;
  });
  protected readonly score = computed(() => {
    const answered = this.round()?.answered ?? [];
    return { right: answered.filter((answer) => answer.correct).length, asked: answered.length };
  });
  protected readonly missed = computed(() => (this.round()?.answered ?? []).filter((answer) => !answer.correct));

  // `read: ElementRef`: on a Material button the template reference is the component, not its element.
  private readonly questionHeading = viewChild('questionHeading', { read: ElementRef<HTMLElement> });
  private readonly nextButton = viewChild('nextButton', { read: ElementRef<HTMLElement> });
  private readonly summaryHeading = viewChild('summaryHeading', { read: ElementRef<HTMLElement> });

  constructor() {
    // The first round starts as soon as both the set and the edition are here.
    effect(() => {
      const askable = this.askable();
      if (askable.length === 0 || untracked(() => this.round()) !== null) return;
      untracked(() => this.#startRound('whole set', askable, false));
    });
  }

  #startRound(kind: Round['kind'], targets: readonly string[], focus = true): void {
    const compiled = this.editions.compiled();
    if (!compiled) return;
    this.feedback.set(null);
    this.typed.set('');
    this.typedProblem.set(null);
    this.round.set({ kind, questions: drillQuestions(compiled, this.setIds(), targets, this.#random()), answered: [] });
    if (focus) this.#focus(this.questionHeading);
  }

  protected startAgain(): void {
    this.#startRound('whole set', this.askable());
  }

  protected practiseMissed(): void {
    this.#startRound(
      'missed',
      this.missed().map((answer) => answer.question.answer.id),
    );
  }

  protected pick(choice: DrillChoice): void {
    const round = this.round();
    const question = this.current();
    const compiled = this.editions.compiled();
    if (!round || !question || !compiled || this.feedback()) return;
    const correct = choice.id === question.answer.id;
    const answered: Answered = { question, picked: choice, correct, differences: correct ? [] : differences(compiled, question.answer.id, choice.id) };
    this.round.set({ ...round, answered: [...round.answered, answered] });
    this.feedback.set(answered);
    this.typedProblem.set(null);
    // The button sits in a bar held at the foot of the screen: focusing it must not scroll the question away.
    this.#focus(this.nextButton, { preventScroll: true });
  }

  protected answerTyped(event: Event): void {
    event.preventDefault();
    const reading = this.#matchName()?.(this.typed()) ?? { kind: 'none' as const };
    if (reading.kind === 'species') {
      this.pick(reading.choice);
      return;
    }
    this.typedProblem.set(
      reading.kind === 'ambiguous'
        ? `“${this.typed().trim()}” could be ${reading.names.join(' or ')}. Type more of the name.`
        : `No species of this set matches “${this.typed().trim()}”. Check the spelling, or pick from the choices.`,
    );
  }

  protected nextQuestion(): void {
    if (!this.feedback()) return;
    this.feedback.set(null);
    this.typed.set('');
    this.#focus(this.finished() ? this.summaryHeading : this.questionHeading);
  }

  /** 1–4 pick a choice and Enter moves on, unless the learner is typing or on a control of their own. */
  protected answerByKey(event: KeyboardEvent): void {
    if (event.altKey || event.ctrlKey || event.metaKey) return;
    const target = event.target as HTMLElement | null;
    if (target?.closest('input, textarea, select, [contenteditable="true"], mat-dialog-container')) return;
    const question = this.current();
    if (!question) return;
    if (!this.feedback() && /^[1-9]$/.test(event.key)) {
      const choice = question.choices[Number(event.key) - 1];
      if (choice) {
        event.preventDefault();
        this.pick(choice);
      }
      return;
    }
    // A focused button or link takes Enter itself; only elsewhere does Enter mean "next".
    if (event.key === 'Enter' && this.feedback() && !target?.closest('button, a')) {
      event.preventDefault();
      this.nextQuestion();
    }
  }

  #focus(element: () => ElementRef<HTMLElement> | undefined, options?: FocusOptions): void {
    afterNextRender(() => element()?.nativeElement.focus(options), { injector: this.#injector });
  }
}
