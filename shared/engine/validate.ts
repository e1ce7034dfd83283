/**
 * Structural and data-quality checks of a matrix document before compilation.
 *
 * Invariant: validateMatrix never throws, whatever it is given; every problem names its path, and
 * a document with no `error` problems compiles without throwing.
 */
import { countSpanOf, MAX_COUNT_SPAN, parseCount, type CountSpan } from './count-span';
import { MatrixValidationError, matrixMessages as m } from './errors';
import { checkTaxonFields, checkTrait } from './field-rules';
import { isNonEmptyString, isObject, KEBAB, ProblemList, type Record_ } from './problem-list';
import type { MatrixDocument, MatrixProblem, Taxon, Trait } from './types';
import { FREQUENCIES } from './vocabulary';

const RANGE_FIELDS = ['min', 'low', 'high', 'max'] as const;

/** What validation learns about each well-formed trait, for checking cells. */
interface TraitFacts {
  trait: Trait;
  valueCodes: Set<string>;
  span?: CountSpan;
}

function checkAppliesWhen(facts: Map<string, TraitFacts>, traitIndex: Map<string, number>, problems: ProblemList): void {
  for (const { trait } of facts.values()) {
    const conditions = trait.appliesWhen;
    if (!conditions) continue;
    const path = `traits[${traitIndex.get(trait.code)}].appliesWhen`;
    for (const [other, allowed] of Object.entries(conditions)) {
      const target = facts.get(other);
      if (other === trait.code) {
        problems.error(path, 'bad-applies-when', m.appliesWhenSelf(trait.code), undefined, trait.code);
      } else if (!target) {
        problems.error(path, 'bad-applies-when', m.appliesWhenUnknownTrait(trait.code, other), undefined, trait.code);
      } else if (target.trait.kind === 'numeric') {
        problems.error(path, 'bad-applies-when', m.appliesWhenNumeric(trait.code, other), undefined, trait.code);
      } else if (!Array.isArray(allowed) || allowed.length === 0) {
        problems.error(path, 'bad-applies-when', m.appliesWhenEmpty(trait.code, other), undefined, trait.code);
      } else {
        for (const value of allowed) {
          if (!isKnownValue(target, value)) {
            problems.error(path, 'bad-applies-when', m.appliesWhenUnknownValue(trait.code, other, value), undefined, trait.code);
          }
        }
      }
    }
  }
  const cycle = findCycle(facts);
  if (cycle) problems.error('traits', 'applies-when-cycle', m.appliesWhenCycle(cycle));
}

function isKnownValue(facts: TraitFacts, value: unknown): boolean {
  if (facts.trait.kind === 'count') {
    const count = parseCount(value);
    return count !== undefined && facts.span !== undefined && count >= facts.span.min && count <= facts.span.max;
  }
  return typeof value === 'string' && facts.valueCodes.has(value);
}

function findCycle(facts: Map<string, TraitFacts>): string[] | undefined {
  const state = new Map<string, 'visiting' | 'done'>();
  const stack: string[] = [];
  const visit = (code: string): string[] | undefined => {
    if (state.get(code) === 'done') return undefined;
    if (state.get(code) === 'visiting') return stack.slice(stack.indexOf(code));
    state.set(code, 'visiting');
    stack.push(code);
    for (const other of Object.keys(facts.get(code)?.trait.appliesWhen ?? {})) {
      if (!facts.has(other) || other === code) continue;
      const found = visit(other);
      if (found) return found;
    }
    stack.pop();
    state.set(code, 'done');
    return undefined;
  };
  for (const code of facts.keys()) {
    const found = visit(code);
    if (found) return found;
  }
  return undefined;
}

/** The cell's path, built only when a problem is reported (validation walks millions of cells). */
function cellPath(position: number, trait: string): string {
  return `taxa[${position}].cells.${trait}`;
}

function hasOnlyKeys(value: Record_, allowed: readonly string[]): boolean {
  for (const key in value) if (!allowed.includes(key)) return false;
  return true;
}

function checkDiscreteCell(cell: unknown, facts: TraitFacts, taxon: string, position: number, problems: ProblemList): void {
  const code = facts.trait.code;
  const path = cellPath(position, code);
  const expected = 'an object with usual/occasional/rare lists';
  if (!isObject(cell) || !hasOnlyKeys(cell, FREQUENCIES)) {
    problems.error(path, 'bad-cell', m.badCell(taxon, code, expected), taxon, code);
    return;
  }
  const seen: Array<string | number> = [];
  let listed = 0;
  for (const frequency of FREQUENCIES) {
    const values = cell[frequency];
    if (values === undefined) continue;
    if (!Array.isArray(values)) {
      problems.error(`${path}.${frequency}`, 'bad-cell', m.badFrequencyList(taxon, code, frequency), taxon, code);
      continue;
    }
    for (const value of values) {
      listed++;
      let key: string | number;
      if (facts.trait.kind === 'count') {
        const count = parseCount(value);
        if (count === undefined) {
          problems.error(`${path}.${frequency}`, 'count-not-integer', m.countNotInteger(taxon, code, value), taxon, code);
          continue;
        }
        const span = facts.span;
        if (span && (count < span.min || count > span.max)) {
          problems.error(`${path}.${frequency}`, 'count-out-of-range', m.countOutOfRange(taxon, code, count, span.min, span.max), taxon, code);
          continue;
        }
        key = count;
      } else {
        if (typeof value !== 'string' || !facts.valueCodes.has(value)) {
          problems.error(`${path}.${frequency}`, 'unknown-value-in-cell', m.unknownValueInCell(taxon, code, value, [...facts.valueCodes]), taxon, code);
          continue;
        }
        key = value;
      }
      if (seen.includes(key)) problems.error(`${path}.${frequency}`, 'value-in-two-frequencies', m.valueTwice(taxon, code, value), taxon, code);
      seen.push(key);
    }
  }
  if (listed === 0) problems.warning(path, 'empty-cell', m.emptyCell(taxon, code), taxon, code);
}

function checkNumericCell(cell: unknown, facts: TraitFacts, taxon: string, position: number, problems: ProblemList): void {
  const code = facts.trait.code;
  const path = cellPath(position, code);
  if (!isObject(cell) || !hasOnlyKeys(cell, RANGE_FIELDS)) {
    problems.error(path, 'bad-cell', m.badCell(taxon, code, 'an object with min, low, high and max'), taxon, code);
    return;
  }
  let finite = true;
  for (const field of RANGE_FIELDS) {
    const value = cell[field];
    if (typeof value !== 'number' || !Number.isFinite(value)) {
      problems.error(`${path}.${field}`, 'range-not-finite', m.rangeNotFinite(taxon, code, field, value), taxon, code);
      finite = false;
    }
  }
  if (!finite) return;
  const range = cell as { min: number; low: number; high: number; max: number };
  if (range.min < 0 || range.low < 0 || range.high < 0 || range.max < 0) {
    problems.error(path, 'range-negative', m.rangeNegative(taxon, code), taxon, code);
    return;
  }
  if (!(range.min <= range.low && range.low <= range.high && range.high <= range.max)) {
    problems.warning(path, 'range-out-of-order', m.rangeOutOfOrder(taxon, code, range), taxon, code);
  }
}

function describeCondition(other: string, allowed: readonly string[]): string {
  return `${other} is ${allowed.join(' or ')}`;
}

/** True when a coded discrete cell lists none of the allowed values, or the cell is inapplicable. */
function isOutsideCondition(cell: unknown, allowed: readonly string[], kind: Trait['kind']): boolean {
  if (cell === 'inapplicable') return true;
  if (!isObject(cell)) return false;
  const listed: unknown[] = [];
  for (const frequency of FREQUENCIES) {
    const values = cell[frequency];
    if (Array.isArray(values)) listed.push(...values);
  }
  if (listed.length === 0) return false;
  const normalise = (value: unknown): string => (kind === 'count' ? String(parseCount(value)) : String(value));
  const wanted = new Set(allowed.map(normalise));
  return !listed.some((value) => wanted.has(normalise(value)));
}

function checkTaxon(
  raw: unknown,
  index: number,
  facts: Map<string, TraitFacts>,
  conditional: readonly TraitFacts[],
  problems: ProblemList,
  seen: Set<string>,
): string | undefined {
  const path = `taxa[${index}]`;
  if (!isObject(raw)) {
    problems.error(path, 'not-an-object', m.notAnObject(path));
    return undefined;
  }
  const id = raw['id'];
  if (!isNonEmptyString(id) || !KEBAB.test(id)) {
    problems.error(`${path}.id`, 'bad-code', m.badCode('Taxon', id));
    return undefined;
  }
  if (seen.has(id)) {
    problems.error(`${path}.id`, 'duplicate-taxon', m.duplicate('Taxon', id), id);
    return undefined;
  }
  seen.add(id);
  checkTaxonFields(raw, path, id, problems);
  const cells = raw['cells'];
  if (!isObject(cells)) {
    problems.error(`${path}.cells`, 'not-an-object', m.notAnObject(`${path}.cells`), id);
    return id;
  }
  for (const traitCode in cells) {
    const cell = cells[traitCode];
    const traitFacts = facts.get(traitCode);
    if (!traitFacts) {
      problems.error(cellPath(index, traitCode), 'unknown-trait-in-cell', m.unknownTraitInCell(id, traitCode), id, traitCode);
      continue;
    }
    if (cell === 'unknown' || cell === 'inapplicable') continue;
    if (traitFacts.trait.kind === 'numeric') checkNumericCell(cell, traitFacts, id, index, problems);
    else checkDiscreteCell(cell, traitFacts, id, index, problems);
  }
  for (const traitFacts of conditional) {
    const conditions = traitFacts.trait.appliesWhen ?? {};
    const own = cells[traitFacts.trait.code];
    if (own === undefined || own === 'unknown' || own === 'inapplicable') continue;
    for (const [other, allowed] of Object.entries(conditions)) {
      const otherFacts = facts.get(other);
      if (!otherFacts || !Array.isArray(allowed)) continue;
      if (isOutsideCondition(cells[other], allowed, otherFacts.trait.kind)) {
        const condition = describeCondition(other, allowed);
        problems.warning(
          cellPath(index, traitFacts.trait.code),
          'applies-when-violation',
          m.appliesWhenViolation(id, traitFacts.trait.code, condition),
          id,
          traitFacts.trait.code,
        );
      }
    }
  }
  return id;
}

/** Every problem of a matrix document: errors stop compilation, warnings are repaired and reported. */
export function validateMatrix(doc: unknown): MatrixProblem[] {
  const problems = new ProblemList();
  if (!isObject(doc)) {
    problems.error('', 'not-an-object', m.notAnObject('The matrix document'));
    return problems.items;
  }
  if (doc['format'] !== 'sylvasift-matrix') problems.error('format', 'wrong-format', m.wrongFormat(doc['format']));
  if (doc['version'] !== 1) problems.error('version', 'wrong-version', m.wrongVersion(doc['version']));
  if (typeof doc['title'] !== 'string') problems.error('title', 'missing-field', m.missingField(undefined, undefined, 'title'));
  const rawTraits = doc['traits'];
  const rawTaxa = doc['taxa'];
  if (!Array.isArray(rawTraits)) problems.error('traits', 'not-a-list', m.notAList('traits'));
  if (!Array.isArray(rawTaxa)) problems.error('taxa', 'not-a-list', m.notAList('taxa'));
  if (!Array.isArray(rawTraits) || !Array.isArray(rawTaxa)) return problems.items;

  const seenTraits = new Set<string>();
  const traits: Trait[] = [];
  const traitIndex = new Map<string, number>();
  rawTraits.forEach((raw: unknown, index: number) => {
    const trait = checkTrait(raw, index, problems, seenTraits);
    if (trait) {
      traits.push(trait);
      traitIndex.set(trait.code, index);
    }
  });
  const wellFormedTaxa = rawTaxa.filter((taxon): taxon is Taxon => isObject(taxon) && isObject(taxon['cells']));
  const facts = new Map<string, TraitFacts>();
  for (const trait of traits) {
    const entry: TraitFacts = { trait, valueCodes: new Set((trait.values ?? []).map((value) => value.code)) };
    if (trait.kind === 'count') {
      const span = countSpanOf(trait, wellFormedTaxa);
      const path = `traits[${traitIndex.get(trait.code)}]`;
      if (!span) {
        problems.error(path, 'counts-undefined', m.countsUndefined(trait.code), undefined, trait.code);
      } else if (span.max - span.min + 1 > MAX_COUNT_SPAN) {
        problems.error(path, 'too-many-counts', m.tooManyCounts(trait.code, span.max - span.min + 1), undefined, trait.code);
      } else {
        entry.span = span;
        for (const value of trait.values ?? []) {
          const count = parseCount(value.code) as number;
          if (count < span.min || count > span.max) {
            problems.error(`${path}.values`, 'count-value-out-of-range', m.countValueOutOfRange(trait.code, count, span.min, span.max), undefined, trait.code);
          }
        }
      }
    }
    facts.set(trait.code, entry);
  }
  checkAppliesWhen(facts, traitIndex, problems);

  const seenTaxa = new Set<string>();
  const conditional = [...facts.values()].filter((entry) => entry.trait.appliesWhen !== undefined);
  rawTaxa.forEach((raw: unknown, index: number) => checkTaxon(raw, index, facts, conditional, problems, seenTaxa));

  const inseparable = doc['inseparable'];
  if (inseparable !== undefined) {
    if (!Array.isArray(inseparable)) {
      problems.error('inseparable', 'not-a-list', m.notAList('inseparable'));
    } else {
      inseparable.forEach((pair: unknown, index: number) => {
        const taxa = isObject(pair) ? pair['taxa'] : undefined;
        const valid =
          isObject(pair) &&
          Array.isArray(taxa) &&
          taxa.length === 2 &&
          taxa[0] !== taxa[1] &&
          taxa.every((id) => typeof id === 'string' && seenTaxa.has(id)) &&
          typeof pair['reason'] === 'string';
        if (!valid) problems.error(`inseparable[${index}]`, 'bad-inseparable', m.badInseparable(index));
      });
    }
  }
  return problems.items;
}

/** Throws a MatrixValidationError listing every problem when the document has any error. */
export function assertValidMatrix(doc: unknown): asserts doc is MatrixDocument {
  const problems = validateMatrix(doc);
  if (problems.some((problem) => problem.severity === 'error')) throw new MatrixValidationError(problems);
}
