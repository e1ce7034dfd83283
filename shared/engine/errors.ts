/**
 * Every message the engine shows or raises is built here, so the wording stays consistent and the
 * API, the console and the tests read the same sentences.
 *
 * Invariant: a message always names what it is about (taxon id, trait code, observation index) and
 * what is wrong, in one plain sentence; nothing here throws except the error classes' users.
 */
import type { MatrixProblem, ObservationProblem } from './types';

function quote(text: unknown): string {
  return typeof text === 'string' ? `"${text}"` : String(text);
}

function list(items: readonly unknown[], max = 8): string {
  const shown = items.slice(0, max).map(quote).join(', ');
  return items.length > max ? `${shown}, …` : shown;
}

function where(taxon: string | undefined, trait: string | undefined): string {
  if (taxon !== undefined && trait !== undefined) return `Taxon ${quote(taxon)}, trait ${quote(trait)}`;
  if (taxon !== undefined) return `Taxon ${quote(taxon)}`;
  if (trait !== undefined) return `Trait ${quote(trait)}`;
  return 'Matrix';
}

/** Messages about matrix documents; each returns one sentence. */
export const matrixMessages = {
  notAnObject: (what: string) => `${what} must be an object.`,
  wrongFormat: (found: unknown) => `Matrix format must be "sylvasift-matrix", found ${quote(found)}.`,
  wrongVersion: (found: unknown) => `Matrix version must be 1, found ${quote(found)}.`,
  missingField: (taxon: string | undefined, trait: string | undefined, field: string) => `${where(taxon, trait)}: the field "${field}" is missing or empty.`,
  notAList: (field: string) => `The field "${field}" must be a list.`,
  badCode: (kind: string, code: unknown) => `${kind} code ${quote(code)} must be kebab-case (lower-case letters and digits joined by single hyphens).`,
  duplicate: (kind: string, code: string) => `${kind} ${quote(code)} appears more than once.`,
  badEnum: (trait: string, field: string, found: unknown, allowed: readonly string[]) =>
    `Trait ${quote(trait)}: ${field} ${quote(found)} is not one of ${list(allowed)}.`,
  badEase: (trait: string, found: unknown) => `Trait ${quote(trait)}: ease must be a finite number from 1 to 5, found ${quote(found)}.`,
  badErrorRate: (trait: string, found: unknown) => `Trait ${quote(trait)}: errorRate must be a number in [0, 0.5), found ${quote(found)}.`,
  noValues: (trait: string) => `Trait ${quote(trait)}: a state trait needs at least one value.`,
  duplicateValue: (trait: string, code: string) => `Trait ${quote(trait)}: value ${quote(code)} is listed twice.`,
  badUnit: (trait: string, found: unknown) => `Trait ${quote(trait)}: numeric ranges must be in "cm", found unit ${quote(found)}.`,
  unitOnNonNumeric: (trait: string) => `Trait ${quote(trait)}: only numeric traits carry a unit.`,
  badCountRange: (trait: string) => `Trait ${quote(trait)}: countRange must be whole numbers with 0 ≤ min ≤ max ≤ 1000.`,
  badCountValue: (trait: string, code: unknown) =>
    `Trait ${quote(trait)}: a count trait's value code must be a whole number written in digits, found ${quote(code)}.`,
  countValueOutOfRange: (trait: string, count: number, min: number, max: number) =>
    `Trait ${quote(trait)}: labelled count ${count} is outside countRange ${min}–${max}.`,
  countsUndefined: (trait: string) => `Trait ${quote(trait)}: a count trait needs a countRange, labelled counts, or at least one coded count.`,
  tooManyCounts: (trait: string, span: number) => `Trait ${quote(trait)}: counts span ${span} values; at most 1001 are supported.`,
  appliesWhenUnknownTrait: (trait: string, other: string) => `Trait ${quote(trait)}: appliesWhen names trait ${quote(other)}, which is not in the matrix.`,
  appliesWhenSelf: (trait: string) => `Trait ${quote(trait)}: appliesWhen cannot name the trait itself.`,
  appliesWhenNumeric: (trait: string, other: string) =>
    `Trait ${quote(trait)}: appliesWhen names numeric trait ${quote(other)}; conditions need a state or count trait.`,
  appliesWhenEmpty: (trait: string, other: string) => `Trait ${quote(trait)}: appliesWhen for ${quote(other)} must list at least one value.`,
  appliesWhenUnknownValue: (trait: string, other: string, value: unknown) =>
    `Trait ${quote(trait)}: appliesWhen value ${quote(value)} is not a value of trait ${quote(other)}.`,
  appliesWhenCycle: (traits: readonly string[]) => `Traits ${list(traits)} depend on each other in a circle through appliesWhen.`,
  unknownTraitInCell: (taxon: string, trait: string) => `Taxon ${quote(taxon)} codes trait ${quote(trait)}, which is not in the matrix.`,
  badCell: (taxon: string, trait: string, expected: string) => `${where(taxon, trait)}: the cell must be ${expected}, "unknown" or "inapplicable".`,
  badFrequencyList: (taxon: string, trait: string, frequency: string) => `${where(taxon, trait)}: "${frequency}" must be a list of values.`,
  unknownValueInCell: (taxon: string, trait: string, value: unknown, allowed: readonly unknown[]) =>
    `${where(taxon, trait)}: value ${quote(value)} is not one of the trait's values (${list(allowed)}).`,
  countNotInteger: (taxon: string, trait: string, value: unknown) => `${where(taxon, trait)}: count ${quote(value)} must be a whole number.`,
  countOutOfRange: (taxon: string, trait: string, value: number, min: number, max: number) =>
    `${where(taxon, trait)}: count ${value} is outside the trait's countRange ${min}–${max}.`,
  valueTwice: (taxon: string, trait: string, value: unknown) => `${where(taxon, trait)}: value ${quote(value)} is listed under more than one frequency.`,
  emptyCell: (taxon: string, trait: string) => `${where(taxon, trait)}: the cell lists no values; it is read as "unknown".`,
  rangeNotFinite: (taxon: string, trait: string, field: string, found: unknown) =>
    `${where(taxon, trait)}: ${field} must be a finite number, found ${quote(found)}.`,
  rangeNegative: (taxon: string, trait: string) => `${where(taxon, trait)}: a length cannot be negative.`,
  rangeOutOfOrder: (taxon: string, trait: string, cell: { min: number; low: number; high: number; max: number }) =>
    `${where(taxon, trait)}: range min ${cell.min}, low ${cell.low}, high ${cell.high}, max ${cell.max} breaks ` +
    'min ≤ low ≤ high ≤ max; it is compiled sorted.',
  badPrior: (taxon: string, found: unknown) => `Taxon ${quote(taxon)}: prior must be a finite number greater than 0, found ${quote(found)}.`,
  appliesWhenViolation: (taxon: string, trait: string, condition: string) =>
    `${where(taxon, trait)}: the trait is coded although the taxon is coded outside its condition (${condition}); ` + 'it is scored as inapplicable.',
  badInseparable: (index: number) => `inseparable[${index}] must name two different taxa of the matrix and give a reason.`,
  tooManyPatterns: (trait: string) => `Trait ${quote(trait)}: more than 65,535 distinct codings; the compiled format cannot hold them.`,
} as const;

/** Messages about observations; each returns one sentence. */
export const observationMessages = {
  notAList: () => 'Observations must be a list.',
  notAnObject: (index: number) => `Observation ${index} must be an object with a trait.`,
  missingTrait: (index: number) => `Observation ${index} has no trait code.`,
  unknownTrait: (index: number, trait: unknown) => `Observation ${index}: trait ${quote(trait)} is not in this edition.`,
  numericNeedsValue: (index: number, trait: string) =>
    `Observation ${index}: ${quote(trait)} is a numeric trait; send one measurement as "value" (and "unit"), not "values".`,
  discreteNeedsValues: (index: number, trait: string, kind: string) =>
    `Observation ${index}: ${quote(trait)} is a ${kind} trait; send "values" as a list, not a single "value".`,
  bothValueAndValues: (index: number) => `Observation ${index} has both "value" and "values"; send one of them.`,
  emptyValues: (index: number, trait: string) => `Observation ${index}: ${quote(trait)} needs at least one value.`,
  unknownValue: (index: number, trait: string, value: unknown, allowed: readonly unknown[]) =>
    `Observation ${index}: ${quote(value)} is not a value of ${quote(trait)} (allowed: ${list(allowed)}).`,
  countNotInteger: (index: number, trait: string, value: unknown) => `Observation ${index}: ${quote(trait)} is a count; ${quote(value)} is not a whole number.`,
  countOutOfRange: (index: number, trait: string, value: number, min: number, max: number) =>
    `Observation ${index}: count ${value} for ${quote(trait)} is outside ${min}–${max}.`,
  duplicateValue: (index: number, trait: string, value: unknown) => `Observation ${index}: value ${quote(value)} of ${quote(trait)} is listed twice.`,
  notFinite: (index: number, trait: string, value: unknown) =>
    `Observation ${index}: the measurement of ${quote(trait)} must be a finite number, found ${quote(value)}.`,
  negative: (index: number, trait: string, value: number) => `Observation ${index}: the measurement of ${quote(trait)} cannot be negative (${value}).`,
  badUnit: (index: number, trait: string, unit: unknown, allowed: readonly string[]) =>
    `Observation ${index}: unit ${quote(unit)} does not fit ${quote(trait)} (use ${list(allowed)}).`,
  unitOnDiscrete: (index: number, trait: string) => `Observation ${index}: ${quote(trait)} is not measured, so it takes no unit.`,
  duplicateTrait: (index: number, trait: string, first: number) =>
    `Observation ${index}: ${quote(trait)} was already observed in observation ${first}; combine them into one.`,
} as const;

/** Messages about engine calls made with wrong arguments. */
export const usageMessages = {
  unknownTaxon: (id: string) => `Taxon ${quote(id)} is not in this edition.`,
  unknownTraitCode: (code: string) => `Trait ${quote(code)} is not in this edition.`,
  notABundle: () => 'These bytes are not a Sylvasift bundle (bad magic number).',
  bundleVersion: (found: number) => `Bundle format version ${found} is not supported (expected 1).`,
  bundleTruncated: () => 'The bundle is truncated or corrupt.',
  badOption: (name: string, found: unknown, expected: string) => `Option ${name} must be ${expected}, found ${quote(found)}.`,
  unknownLengthUnit: (unit: unknown) => `Unknown length unit ${quote(unit)}; use "cm", "mm" or "in".`,
} as const;

/** Raised by compileMatrix (and assertValidMatrix) when a document has errors; carries every problem. */
export class MatrixValidationError extends Error {
  readonly problems: MatrixProblem[];
  constructor(problems: MatrixProblem[]) {
    const errors = problems.filter((problem) => problem.severity === 'error');
    const head = errors
      .slice(0, 5)
      .map((problem) => problem.message)
      .join(' ');
    const more = errors.length > 5 ? ` (and ${errors.length - 5} more)` : '';
    super(`The matrix has ${errors.length} error${errors.length === 1 ? '' : 's'}: ${head}${more}`);
    this.name = 'MatrixValidationError';
    this.problems = problems;
  }
}

/** Raised by rank/suggest when observations are invalid; carries the same problems validateObservations returns. */
export class ObservationError extends Error {
  readonly problems: ObservationProblem[];
  constructor(problems: ObservationProblem[]) {
    super(problems.map((problem) => problem.message).join(' '));
    this.name = 'ObservationError';
    this.problems = problems;
  }
}

/** Raised for wrong arguments to engine calls (unknown taxon id, corrupt bundle, bad option). */
export class EngineUsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'EngineUsageError';
  }
}
