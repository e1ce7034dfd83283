/**
 * Plain-language sentences for reasons, comparisons, keys and suggestion previews.
 *
 * Invariant: every sentence is built from the edition's own labels, so the UI shows it as is.
 */
import { cellInWords, NOT_APPLICABLE_WORDS, NOT_CODED_WORDS } from './cell-words';
import { INAPPLICABLE_PATTERN, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import { cellFromPattern } from './lookup';
import type { PreparedMeasure, PreparedObservation } from './observations';
import type { SkipCause } from './scoring';
import type { Cell } from './types';
import { answerLabelAt, formatLength, formatNumber, inSentence, joinOr } from './words';

/** A value's label inside a sentence. */
function answerInSentence(trait: CompiledTrait, answer: number): string {
  return inSentence(answerLabelAt(trait, answer));
}

export function observedText(observation: PreparedObservation): string {
  if (observation.kind === 'set') return joinOr(observation.answers.map((answer) => answerInSentence(observation.trait, answer)));
  return measuredText(observation);
}

function measuredText(observation: PreparedMeasure): string {
  if (observation.shownUnit === 'cm') return formatLength(observation.centimetres);
  return `${formatNumber(observation.shownValue)} ${observation.shownUnit} (${formatLength(observation.centimetres)})`;
}

export const reasonTexts = {
  matched: (trait: CompiledTrait, seen: string) => `${trait.label}: you saw ${seen}, which is usual for this species.`,
  partial: (trait: CompiledTrait, seen: string, coded: string) => `${trait.label}: you saw ${seen}; this species shows it less often (${coded}).`,
  conflict: (trait: CompiledTrait, seen: string, coded: string) => `${trait.label}: you saw ${seen}, but this species is ${coded}.`,
  notCoded: (trait: CompiledTrait) => `${trait.label} is not coded for this species yet, so it counts neither for nor against it.`,
  doesNotApply: (trait: CompiledTrait) => `${trait.label} does not apply to this species, so seeing it counts against it.`,
  typical: (trait: CompiledTrait, seen: string, low: number, high: number) =>
    `${trait.label}: ${seen} is inside this species' typical range of ${formatNumber(low)}–${formatNumber(high)} cm.`,
  extreme: (trait: CompiledTrait, seen: string, cell: { min: number; low: number; high: number; max: number }) =>
    `${trait.label}: ${seen} is outside the typical ${formatNumber(cell.low)}–${formatNumber(cell.high)} cm but within the recorded ${formatNumber(cell.min)}–${formatNumber(cell.max)} cm.`,
  outside: (trait: CompiledTrait, seen: string, min: number, max: number) =>
    `${trait.label}: ${seen} is outside this species' recorded range of ${formatNumber(min)}–${formatNumber(max)} cm.`,
  skipped: (compiled: CompiledMatrix, trait: CompiledTrait, cause: SkipCause) => {
    const condition = compiled.traits[cause.condition.trait];
    const allowed = joinOr(cause.condition.allowed.map((answer) => answerInSentence(condition, answer)));
    const seen = observedText(cause.contradictedBy);
    return `${trait.label} was set aside: it only applies when ${condition.label} is ${allowed}, and you saw ${seen}.`;
  },
} as const;

const patternTexts = new WeakMap<CompiledMatrix, Array<Array<string | undefined>>>();

/**
 * cellInWords of a discrete trait's pattern (which stands for the same cell whichever taxon has it),
 * built once per matrix, trait and pattern.
 */
export function patternText(compiled: CompiledMatrix, trait: CompiledTrait, pattern: number): string {
  let byTrait = patternTexts.get(compiled);
  if (!byTrait) {
    byTrait = [];
    patternTexts.set(compiled, byTrait);
  }
  const texts = (byTrait[trait.index] ??= []);
  return (texts[pattern] ??= cellInWords(trait, cellFromPattern(compiled, trait, pattern, 0)));
}

/** A short description of a pattern, for conflicts: "usually 2 or 3" or "not coded". */
export function patternPhrase(trait: CompiledTrait, pattern: number, cell: Cell): string {
  if (pattern === UNKNOWN_PATTERN) return NOT_CODED_WORDS;
  if (pattern === INAPPLICABLE_PATTERN) return NOT_APPLICABLE_WORDS;
  return cellInWords(trait, cell);
}
