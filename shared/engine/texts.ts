/**
 * Plain-language sentences for reasons, comparisons, keys and suggestion previews.
 *
 * Invariant: every sentence is built from the edition's own labels, so the UI shows it as is.
 */
import { INAPPLICABLE_PATTERN, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled';
import { cellFromPattern } from './lookup';
import type { PreparedMeasure, PreparedObservation } from './observations';
import type { SkipCause } from './scoring';
import type { Cell } from './types';

/** A number rounded to at most two decimals, without trailing zeros: 12, 12.5, 12.05. */
export function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  const hundredths = Math.round(value * 100);
  // the digits are put together by hand (several times faster than number-to-string), where exact
  if (hundredths < 0 || hundredths > Number.MAX_SAFE_INTEGER) return String(hundredths / 100);
  const whole = Math.floor(hundredths / 100);
  const rest = hundredths - whole * 100;
  if (rest === 0) return `${whole}`;
  if (rest % 10 === 0) return `${whole}.${rest / 10}`;
  return `${whole}.${rest < 10 ? '0' : ''}${rest}`;
}

export function formatLength(centimetres: number): string {
  return `${formatNumber(centimetres)} cm`;
}

/** "a or b" / "a, b or c" */
export function joinOr(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} or ${items[items.length - 1]}`;
}

/** "a and b" / "a, b and c" */
export function joinAnd(items: readonly string[]): string {
  if (items.length <= 1) return items.join('');
  return `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

export function answerLabel(trait: CompiledTrait, answer: number): string {
  return trait.answerLabels[answer] ?? String(trait.answerCodes[answer]);
}

/**
 * A value label as it reads inside a sentence: "Deeply furrowed" → "deeply furrowed". Only a capital
 * followed by a small letter is lowered, so initialisms and labels such as "U- or V-shaped" stay.
 */
export function inSentence(label: string): string {
  const first = label.charAt(0);
  const second = label.charAt(1);
  if (first === first.toLowerCase() || second === '' || second === second.toUpperCase()) return label;
  return first.toLowerCase() + label.slice(1);
}

/** A value's label inside a sentence. */
function answerInSentence(trait: CompiledTrait, answer: number): string {
  return inSentence(answerLabel(trait, answer));
}

export function observedText(observation: PreparedObservation): string {
  if (observation.kind === 'set') return joinOr(observation.answers.map((answer) => answerInSentence(observation.trait, answer)));
  return measuredText(observation);
}

function measuredText(observation: PreparedMeasure): string {
  if (observation.shownUnit === 'cm') return formatLength(observation.centimetres);
  return `${formatNumber(observation.shownValue)} ${observation.shownUnit} (${formatLength(observation.centimetres)})`;
}

/** "usually 2 or 3, occasionally 4" for a discrete cell. */
export function codedText(trait: CompiledTrait, cell: Cell): string {
  if (cell === 'unknown') return 'not coded';
  if (cell === 'inapplicable') return 'not applicable';
  if ('min' in cell) return `typically ${formatNumber(cell.low)}–${formatNumber(cell.high)} cm, recorded ${formatNumber(cell.min)}–${formatNumber(cell.max)} cm`;
  const parts: string[] = [];
  if (cell.usual?.length) parts.push(`usually ${labelsOf(trait, cell.usual)}`);
  if (cell.occasional?.length) parts.push(`occasionally ${labelsOf(trait, cell.occasional)}`);
  if (cell.rare?.length) parts.push(`rarely ${labelsOf(trait, cell.rare)}`);
  return parts.join(', ');
}

/** "a or b" of coded values' labels (a value the trait does not list is shown as coded). */
function labelsOf(trait: CompiledTrait, values: ReadonlyArray<string | number>): string {
  const labels: string[] = [];
  for (const value of values) {
    const index = trait.answerCodes.indexOf(value);
    labels.push(index >= 0 ? answerInSentence(trait, index) : String(value));
  }
  return joinOr(labels);
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
 * codedText of a discrete trait's pattern (which stands for the same cell whichever taxon has it),
 * built once per matrix, trait and pattern.
 */
export function patternText(compiled: CompiledMatrix, trait: CompiledTrait, pattern: number): string {
  let byTrait = patternTexts.get(compiled);
  if (!byTrait) {
    byTrait = [];
    patternTexts.set(compiled, byTrait);
  }
  const texts = (byTrait[trait.index] ??= []);
  return (texts[pattern] ??= codedText(trait, cellFromPattern(compiled, trait, pattern, 0)));
}

/** A short description of a pattern, for conflicts: "usually 2 or 3" or "not coded". */
export function patternPhrase(trait: CompiledTrait, pattern: number, cell: Cell): string {
  if (pattern === UNKNOWN_PATTERN) return 'not coded';
  if (pattern === INAPPLICABLE_PATTERN) return 'not applicable';
  return codedText(trait, cell);
}
