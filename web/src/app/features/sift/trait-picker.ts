import { ChangeDetectionStrategy, Component, Injector, afterNextRender, computed, inject, input, linkedSignal, output, signal, untracked } from '@angular/core';
import { MatExpansionPanel, MatExpansionPanelContent, MatExpansionPanelHeader, MatExpansionPanelTitle, MatAccordion } from '@angular/material/expansion';
import { MatChipAvatar, MatChipListbox, MatChipOption, type MatChipListboxChange } from '@angular/material/chips';
import { MatIcon } from '@angular/material/icon';
import { MatIconButton, MatButton } from '@angular/material/button';
import { MatButtonToggle, MatButtonToggleGroup, type MatButtonToggleChange } from '@angular/material/button-toggle';
import { MatFormField, MatLabel, MatHint } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { answerLabel, formatNumber, PART_LABELS, PLANT_PARTS, visibleInSeason, type CompiledMatrix, type CompiledTrait, type LengthUnit, type Observation, type ObservingSeason, type PlantPart } from '@shared/engine';
import { illustrationUrl } from '../../shared/matrix-words';
import { isNumericObservation } from './sift-query';

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

function viewOf(trait: CompiledTrait): TraitView {
  if (trait.kind === 'numeric') return { trait, input: 'measure', options: [] };
  if (trait.kind === 'count' && trait.answerCount > MAX_COUNT_CHIPS) return { trait, input: 'count', options: [] };
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
  return { trait, input: 'chips', options };
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

  readonly #views = computed(() => this.compiled().traits.map(viewOf));

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

  protected enterCount(trait: CompiledTrait, text: string): void {
    const count = Number(text);
    const valid = text.trim() !== '' && Number.isInteger(count) && count >= trait.countMin && count <= this.countMax(trait);
    this.changed.emit({ trait: trait.code, observation: valid ? { trait: trait.code, values: [count] } : null });
  }

  protected enterMeasure(trait: CompiledTrait, text: string, unit: LengthUnit): void {
    const value = Number(text);
    const valid = text.trim() !== '' && Number.isFinite(value) && value > 0;
    this.changed.emit({ trait: trait.code, observation: valid ? { trait: trait.code, value, unit } : null });
  }

  protected switchUnit(trait: CompiledTrait, change: MatButtonToggleChange): void {
    const unit = change.value as LengthUnit;
    this.preferredUnit.set(unit);
    const current = this.observed().get(trait.code);
    if (current && isNumericObservation(current)) this.changed.emit({ trait: trait.code, observation: { ...current, unit } });
  }

  protected clearTrait(code: string): void {
    this.changed.emit({ trait: code, observation: null });
  }

  /** Opens the trait's part, scrolls it into view and focuses its chip (or its first control). */
  reveal(code: string, answer?: string | number): void {
    const trait = this.compiled().traits.find((candidate) => candidate.code === code);
    if (!trait) return;
    this.setPartOpen(trait.part, true);
    afterNextRender(() => this.#focusWhenReady(code, answer, true), { injector: this.#injector });
  }

  /**
   * A panel's lazy content appears a frame or two after it opens, and cannot take focus until its
   * expand animation has started; try for up to half a second.
   */
  #focusWhenReady(code: string, answer: string | number | undefined, scroll: boolean, framesLeft = 30): void {
    const section = document.getElementById(`trait-${code}`);
    if (section) {
      if (scroll) section.scrollIntoView({ block: 'center' });
      const chip = answer === undefined ? null : document.getElementById(chipId(code, answer));
      const target = chip?.querySelector<HTMLElement>('[role="option"]') ?? section.querySelector<HTMLElement>('[role="option"], input');
      target?.focus({ preventScroll: true });
      if (!target || document.activeElement === target) return;
    }
    if (framesLeft > 0) requestAnimationFrame(() => this.#focusWhenReady(code, answer, scroll && !section, framesLeft - 1));
  }
}
