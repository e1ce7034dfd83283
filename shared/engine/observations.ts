/**
 * Checking and normalising what observers report.
 *
 * Invariant: a PreparedObservation always refers to a trait of the compiled matrix and holds either
 * distinct in-range answer indexes (state/count) or one finite, non-negative length in centimetres.
 */
import type { CompiledMatrix, CompiledTrait } from './compiled-matrix';
import { parseCount } from './count-span';
import { ObservationError, observationMessages as m } from './errors';
import type { LengthUnit, Observation, ObservationField, ObservationProblem } from './types';
import { isLengthUnit, LENGTH_UNITS, toCentimetres } from './units';

export interface PreparedSet {
  kind: 'set';
  /** position in the submitted list */
  index: number;
  trait: CompiledTrait;
  /** distinct answer indexes, in the order given */
  answers: number[];
}

export interface PreparedMeasure {
  kind: 'measure';
  index: number;
  trait: CompiledTrait;
  centimetres: number;
  /** the value and unit as the observer gave them, for explanations */
  shownValue: number;
  shownUnit: LengthUnit;
}

export type PreparedObservation = PreparedSet | PreparedMeasure;

type Raw = Record<string, unknown>;

function isObject(value: unknown): value is Raw {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

function answerOf(trait: CompiledTrait, value: unknown): number {
  if (trait.kind === 'count') {
    const count = parseCount(value);
    return count === undefined ? -1 : count - trait.countMin;
  }
  return typeof value === 'string' ? trait.answerCodes.indexOf(value) : -1;
}

/** Records one problem of observation `index` (a plain function, so checking creates no closures). */
function report(problems: ObservationProblem[], index: number, field: ObservationField, code: string, message: string): void {
  problems.push({ index, field, code, message });
}

function checkDiscrete(raw: Raw, index: number, trait: CompiledTrait, problems: ObservationProblem[]): number[] {
  if (raw['unit'] !== undefined) report(problems, index, 'unit', 'bad-unit', m.unitOnDiscrete(index, trait.code));
  const values = raw['values'];
  if (!Array.isArray(values)) {
    report(problems, index, raw['value'] !== undefined ? 'value' : 'values', 'wrong-kind', m.discreteNeedsValues(index, trait.code, trait.kind));
    return [];
  }
  if (values.length === 0) {
    report(problems, index, 'values', 'empty-values', m.emptyValues(index, trait.code));
    return [];
  }
  const answers: number[] = [];
  for (const value of values) {
    if (trait.kind === 'count') {
      const count = parseCount(value);
      if (count === undefined) {
        report(problems, index, 'values', 'not-an-integer', m.countNotInteger(index, trait.code, value));
        continue;
      }
      const max = trait.countMin + trait.answerCount - 1;
      if (count < trait.countMin || count > max) {
        report(problems, index, 'values', 'unknown-value', m.countOutOfRange(index, trait.code, count, trait.countMin, max));
        continue;
      }
    }
    const answer = answerOf(trait, value);
    if (answer < 0) {
      report(problems, index, 'values', 'unknown-value', m.unknownValue(index, trait.code, value, trait.answerCodes));
      continue;
    }
    if (answers.includes(answer)) {
      report(problems, index, 'values', 'duplicate-value', m.duplicateValue(index, trait.code, value));
      continue;
    }
    answers.push(answer);
  }
  return answers;
}

function checkMeasure(raw: Raw, index: number, trait: CompiledTrait, problems: ObservationProblem[]): { value: number; unit: LengthUnit } | undefined {
  if (raw['values'] !== undefined) {
    report(problems, index, 'values', 'wrong-kind', m.numericNeedsValue(index, trait.code));
    return undefined;
  }
  const value = raw['value'];
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    report(problems, index, 'value', 'not-finite', m.notFinite(index, trait.code, value));
    return undefined;
  }
  if (value < 0) {
    report(problems, index, 'value', 'negative', m.negative(index, trait.code, value));
    return undefined;
  }
  const unit = raw['unit'] ?? trait.unit ?? 'cm';
  if (!isLengthUnit(unit)) {
    report(problems, index, 'unit', 'bad-unit', m.badUnit(index, trait.code, unit, LENGTH_UNITS));
    return undefined;
  }
  return { value, unit };
}

interface Checked {
  problems: ObservationProblem[];
  prepared: PreparedObservation[];
}

function check(compiled: CompiledMatrix, observations: unknown): Checked {
  const problems: ObservationProblem[] = [];
  const prepared: PreparedObservation[] = [];
  if (!Array.isArray(observations)) {
    problems.push({ index: -1, field: 'observation', code: 'not-a-list', message: m.notAList() });
    return { problems, prepared };
  }
  const firstIndexOfTrait = new Map<string, number>();
  for (let index = 0; index < observations.length; index++) {
    const raw: unknown = observations[index];
    const before = problems.length;
    if (!isObject(raw)) {
      report(problems, index, 'observation', 'not-an-object', m.notAnObject(index));
      continue;
    }
    const code = raw['trait'];
    if (typeof code !== 'string' || code.length === 0) {
      report(problems, index, 'trait', 'missing-trait', m.missingTrait(index));
      continue;
    }
    const traitIndex = compiled.traitIndexByCode.get(code);
    if (traitIndex === undefined) {
      report(problems, index, 'trait', 'unknown-trait', m.unknownTrait(index, code));
      continue;
    }
    const trait = compiled.traits[traitIndex];
    const first = firstIndexOfTrait.get(code);
    if (first !== undefined) {
      report(problems, index, 'trait', 'duplicate-trait', m.duplicateTrait(index, code, first));
      continue;
    }
    firstIndexOfTrait.set(code, index);
    if (raw['value'] !== undefined && raw['values'] !== undefined) {
      report(problems, index, 'observation', 'both-value-and-values', m.bothValueAndValues(index));
      continue;
    }
    if (trait.kind === 'numeric') {
      const measure = checkMeasure(raw, index, trait, problems);
      if (measure && problems.length === before) {
        prepared.push({
          kind: 'measure',
          index,
          trait,
          centimetres: toCentimetres(measure.value, measure.unit),
          shownValue: measure.value,
          shownUnit: measure.unit,
        });
      }
    } else {
      const answers = checkDiscrete(raw, index, trait, problems);
      if (problems.length === before) prepared.push({ kind: 'set', index, trait, answers });
    }
  }
  return { problems, prepared };
}

/** Every problem of a list of observations against an edition; empty when all is well. */
export function validateObservations(compiled: CompiledMatrix, observations: unknown): ObservationProblem[] {
  return check(compiled, observations).problems;
}

/** Normalised observations; throws ObservationError (carrying every problem) when any is invalid. */
export function prepareObservations(compiled: CompiledMatrix, observations: readonly Observation[]): PreparedObservation[] {
  const { problems, prepared } = check(compiled, observations);
  if (problems.length > 0) throw new ObservationError(problems);
  return prepared;
}
