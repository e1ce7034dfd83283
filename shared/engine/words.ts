/**
 * The small words every tier writes the same way: numbers, lists, value labels and species names.
 *
 * Invariant: each function is total (any number, any list, a label the trait does not know) and
 * returns the same text in the engine, the API and the browser.
 */
import type { CompiledTrait } from './compiled-matrix';
import type { TraitValue } from './types';

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

/** A length in centimetres: "12.5 cm". */
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

/** The label of a compiled trait's answer by its index (the engine's own numbering). */
export function answerLabelAt(trait: CompiledTrait, answer: number): string {
  return trait.answerLabels[answer] ?? String(trait.answerCodes[answer]);
}

/**
 * A trait as far as labelling its values goes: a matrix document's trait (its `values`) or a
 * compiled one (its answer codes and labels, which also label counts the document leaves bare).
 */
export interface LabelledTrait {
  readonly values?: readonly TraitValue[];
  readonly answerCodes?: ReadonlyArray<string | number>;
  readonly answerLabels?: readonly string[];
}

/** The label of one coded value (a state code or a count); a value the trait does not label reads as itself. */
export function valueLabel(trait: LabelledTrait, value: string | number): string {
  const code = String(value);
  if (trait.answerCodes && trait.answerLabels) {
    const index = trait.answerCodes.findIndex((answer) => String(answer) === code);
    return (index >= 0 && trait.answerLabels[index]) || code;
  }
  return trait.values?.find((candidate) => candidate.code === code)?.label || code;
}

/** The display label of one answer (a state code or a count) of a discrete trait. */
export function answerLabel(trait: CompiledTrait, answer: string | number): string {
  return valueLabel(trait, answer);
}

/** The first common name, capitalised for headings and lists ("Eastern white pine"), else the scientific name. */
export function commonName(taxon: { readonly commonNames: readonly string[]; readonly scientificName: string }): string {
  const name = taxon.commonNames[0];
  return name ? name.charAt(0).toUpperCase() + name.slice(1) : taxon.scientificName;
}
