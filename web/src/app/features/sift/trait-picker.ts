import { ChangeDetectionStrategy, Component, Injector, afterNextRender, computed, inject, input, linkedSignal, output, signal, untracked } from '@angular/core';
import { MatExpansionPanel, MatExpansionPanelContent, MatExpansionPanelHeader, MatExpansionPanelTitle, MatAccordion } from '@angular/material/expansion';
import { MatChipAvatar, MatChipListbox, MatChipOption, type MatChipListboxChange } from '@angular/material/chips';
import { MatIcon } from '@angular/material/icon';
import { MatIconButton, MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup, type MatButtonToggleChange } from '@angular/material/button-toggle';
import { MatFormField, MatLabel, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import {
  answerLabel,
  formatNumber,
  PART_LABELS,
  PLANT_PARTS,
  visibleInSeason,
  type CompiledMatrix,
  type CompiledTrait,
  type LengthUnit,
  type Observation,
  type ObservingSeason,
  type PlantPart,
} from '@shared/engine';
import { illustrationUrl } from '../../shared/matrix-words';
import { isNumericObservation } from './sift-query';
import { type NumericSpan, convertTyped, countProblem, lengthProblem, numericSpan, outsideNote, plural, spanText } from './measure-words';

/** Discrete traits with more answers than this take a typed count instead of chips. */
const MAX_COUNT_CHIPS = 12;

export interface AnswerOption {
  answer: string | number;
  label: string;
  definition?: string;
  illustration: string | null;
  chipId: string;
}

export interface TraitView {
  trait: CompiledTrait;
  input: 'chips' | 'count' | 'measure';
  options: AnswerOption[];
  /** numeric traits: the lengths species here show */
  span: NumericSpan | null;
}

export interface PartGroup {
  part: PlantPart;
  label: string;
  traits: TraitView[];
}

export interface ObservationChange {
  trait: string;
  observation: Observation | null;
}

export function chipId(trait: string, answer: string | number): string {
  return `chip-${trait}-${answer}`;
}

function viewOf(compiled: CompiledMatrix, trait: CompiledTrait): TraitView {
  if (trait.kind === 'numeric') return { trait, input: 'measure', options: [], span: numericSpan(compiled, trait) };
  if (trait.kind === 'count' && trait.answerCount > MAX_COUNT_CHIPS) return { trait, input: 'count', options: [], span: null };
  const options = trait.answerCodes.map((answer) => {
    const value = trait.values.find((candidate) => candidate.code === String(answer));
    return {
      answer,
      label: answerLabel(trait, answer),
      definition: value?.definition,
      illustration: illustrationUrl(value?.illustration),
      chipId: chipId(trait.code, answer),
    };
  });
  return { trait, input: 'chips', options, span: null };
}

/** Visible when the season shows it and no observation contradicts its appliesWhen condition. */
export function traitVisible(trait: CompiledTrait, season: ObservingSeason, observed: ReadonlyMap<string, Observation>): boolean {
  if (!visibleInSeason(trait, season)) return false;
  for (const [code, allowed] of Object.entries(trait.appliesWhen ?? {})) {
    const observation = observed.get(code);
    if (!observation || isNumericObservation(observation)) continue;
    if (!observation.values.some((value) => allowed.includes(String(value)))) return false;
  }
  return true;
}

@Component({
  selector: 'sv-trait-picker',
  imports: [
    MatAccordion,
    MatExpansionPanel,
    MatExpansionPanelHeader,
    MatExpansionPanelTitle,
    MatExpansionPanelContent,
    MatChipListbox,
    MatChipOption,
    MatChipAvatar,
    MatIcon,
    MatIconButton,
    MatButton,
    MatButtonToggleGroup,
    MatButtonToggle,
    MatFormField,
    MatLabel,
    MatHint,
    MatInput,
  ],
  templateUrl: './trait-picker.html',
  styleUrl: './trait-picker.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TraitPicker {
  readonly #injector = inject(Injector);

  readonly compiled = input.required<CompiledMatrix>();
  readonly observations = input.required<readonly Observation[]>();
  readonly season = input.required<ObservingSeason>();
  readonly changed = output<ObservationChange>();

  /** Parts holding an observation start open; with none, the leaf part on a wide screen. */
  protected readonly openParts = linkedSignal<ReadonlySet<PlantPart>>(() => {
    const compiled = this.compiled();
    const parts = new Set(
      untracked(() => this.observations())
        .map((observation) => compiled.traits[compiled.traitIndexByCode.get(observation.trait) ?? -1]?.part)
        .filter((part): part is PlantPart => part !== undefined),
    );
    if (parts.size === 0 && window.matchMedia('(min-width: 960px)').matches) parts.add('leaf');
    return parts;
  });
  protected readonly openHelp = signal<ReadonlySet<string>>(new Set());
  /** the unit offered for new measurements; follows the last one chosen */
  protected readonly preferredUnit = signal<LengthUnit>('cm');

  protected readonly observed = computed(() => new Map(this.observations().map((observation) => [observation.trait, observation])));

  readonly #views = computed(() => {
    const compiled = this.compiled();
    return compiled.traits.map((trait) => viewOf(compiled, trait));
  });
  /** what was typed into a number field and cannot be used, by trait code */
  protected readonly problems = signal<ReadonlyMap<string, string>>(new Map());
  protected readonly plural = plural;

  protected readonly groups = computed<PartGroup[]>(() => {
    const season = this.season();
    const observed = this.observed();
    const visible = this.#views().filter((view) => traitVisible(view.trait, season, observed));
    return PLANT_PARTS.map((part) => ({ part, label: PART_LABELS[part], traits: visible.filter((view) => view.trait.part === part) })).filter(
      (group) => group.traits.length > 0,
    );
  });

  protected selectedAnswers(code: string): Array<string | number> {
    const observation = this.observed().get(code);
    return observation && !isNumericObservation(observation) ? observation.values : [];
  }

  protected measured(code: string): { value: string; unit: LengthUnit } {
    const observation = this.observed().get(code);
    if (observation && isNumericObservation(observation)) return { value: formatNumber(observation.value), unit: observation.unit ?? 'cm' };
    return { value: '', unit: this.preferredUnit() };
  }

  protected countValue(code: string): string {
    const answers = this.selectedAnswers(code);
    return answers.length > 0 ? String(answers[0]) : '';
  }

  protected setPartOpen(part: PlantPart, open: boolean): void {
    this.openParts.update((parts) => {
      const next = new Set(parts);
      if (open) next.add(part);
      else next.delete(part);
      return next;
    });
  }

  protected toggleHelp(code: string): void {
    this.openHelp.update((open) => {
      const next = new Set(open);
      if (!next.delete(code)) next.add(code);
      return next;
    });
  }

  protected chooseAnswers(trait: CompiledTrait, change: MatChipListboxChange): void {
    const chosen = Array.isArray(change.value) ? (change.value as Array<string | number>) : [];
    // Keep the trait's own answer order so the URL does not depend on the tapping order.
    const values = trait.answerCodes.filter((answer) => chosen.includes(answer));
    this.changed.emit({ trait: trait.code, observation: values.length > 0 ? { trait: trait.code, values } : null });
  }

  /** The largest count an observer may report for a count trait. */
  protected countMax(trait: CompiledTrait): number {
    return trait.countMin + trait.answerCount - 1;
  }

  #setProblem(code: string, problem: string | null): void {
    this.problems.update((problems) => {
      const next = new Map(problems);
      if (problem) next.set(code, problem);
      else next.delete(code);
      return next;
    });
  }

  /** An out-of-range note for a length that counts but lies beyond every species here. */
  protected measureNote(view: TraitView): string | null {
    const observation = this.observed().get(view.trait.code);
    if (!view.span || !observation || !isNumericObservation(observation)) return null;
    return outsideNote(view.span, observation.value, observation.unit ?? 'cm');
  }

  protected spanWords(view: TraitView, unit: LengthUnit): string {
    return view.span ? spanText(view.span, unit) : '';
  }

  protected enterCount(trait: CompiledTrait, text: string): void {
    const problem = countProblem(text, trait.countMin, this.countMax(trait));
    this.#setProblem(trait.code, problem);
    const valid = text.trim() !== '' && !problem;
    this.changed.emit({ trait: trait.code, observation: valid ? { trait: trait.code, values: [Number(text)] } : null });
  }

  protected enterMeasure(trait: CompiledTrait, text: string, unit: LengthUnit): void {
    const problem = lengthProblem(text);
    this.#setProblem(trait.code, problem);
    const valid = text.trim() !== '' && !problem;
    this.changed.emit({ trait: trait.code, observation: valid ? { trait: trait.code, value: Number(text), unit } : null });
  }

  /** A new unit converts what is typed (8 cm becomes 3.1 in); it never relabels the number. */
  protected switchUnit(trait: CompiledTrait, change: MatButtonToggleChange, typed: string, from: LengthUnit): void {
    const unit = change.value as LengthUnit;
    this.preferredUnit.set(unit);
    if (typed.trim() === '' || lengthProblem(typed)) return;
    const value = convertTyped(Number(typed), from, unit);
    this.changed.emit({ trait: trait.code, observation: { trait: trait.code, value, unit } });
  }

  protected clearTrait(code: string): void {
    this.#setProblem(code, null);
    this.changed.emit({ trait: code, observation: null });
  }

  /**
   * Opens the trait's part, then — once its content is rendered and the panel has finished opening —
   * scrolls the trait to the middle of the screen and focuses its chip (or its first control).
   */
  reveal(code: string, answer?: string | number): void {
    const trait = this.compiled().traits.find((candidate) => candidate.code === code);
    if (!trait) return;
    this.setPartOpen(trait.part, true);
    afterNextRender(() => void this.#revealWhenReady(code, answer), { injector: this.#injector });
  }

  async #revealWhenReady(code: string, answer: string | number | undefined): Promise<void> {
    // A panel's lazy content appears a frame or two after it opens.
    let section: HTMLElement | null = null;
    for (let frame = 0; frame < 30 && !section; frame++) {
      section = document.getElementById(`trait-${code}`);
      if (!section) await nextFrame();
    }
    if (!section) return;
    // Scrolling while the panel still grows lands short of the trait: wait for the opening to end.
    const panel = section.closest('mat-expansion-panel') ?? section;
    await Promise.allSettled(panel.getAnimations({ subtree: true }).map((animation) => animation.finished));
    const chip = answer === undefined ? null : document.getElementById(chipId(code, answer));
    const target = chip?.querySelector<HTMLElement>('[role="option"]') ?? section.querySelector<HTMLElement>('[role="option"], input');
    // Late layout (drawings loading, the panel's last frame) can still move it: settle over a few frames.
    let lastTop = Number.NaN;
    for (let frame = 0; frame < 10; frame++) {
      const top = section.getBoundingClientRect().top;
      if (Math.abs(top - lastTop) < 1) break;
      section.scrollIntoView({ block: section.offsetHeight > window.innerHeight * 0.8 ? 'start' : 'center' });
      lastTop = section.getBoundingClientRect().top;
      target?.focus({ preventScroll: true });
      await nextFrame();
    }
  }
}

function nextFrame(): Promise<void> {
  return new Promise((resolve) => requestAnimationFrame(() => resolve()));
}
