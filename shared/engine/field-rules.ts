/**
 * The field checks of traits and taxa, as tables: each row names a field, the problem it reports and
 * what it accepts, and the rows run in order.
 *
 * Invariant: a trait is returned only when every one of its rows passes; a taxon's rows report
 * errors but never stop its cells being checked.
 */
import { parseCount } from './count-span';
import { matrixMessages as m } from './errors';
import { isNonEmptyString, isObject, KEBAB, type ProblemList, type Record_ } from './problem-list';
import type { Trait } from './types';
import { PLANT_PARTS, SEASONS, TRAIT_KINDS } from './vocabulary';

const STATUSES = ['native', 'naturalised', 'introduced'] as const;

/**
 * One check of a field of a trait or taxon: the problem code it reports, whether the raw object's
 * field is acceptable, and the message naming the trait or taxon that owns it.
 */
interface FieldRule {
  field: string;
  problem: string;
  accepts(value: unknown, raw: Record_): boolean;
  message(owner: string, value: unknown, path: string, raw: Record_): string;
}

/** A field check that reports problems of its own (a list whose items are checked one by one); true when all is well. */
interface ListRule {
  field: string;
  check(value: unknown, raw: Record_, owner: string, path: string, problems: ProblemList): boolean;
}

function isFiniteNumber(value: unknown): value is number {
  return typeof value === 'number' && Number.isFinite(value);
}

function oneOf(allowed: readonly string[]): (value: unknown) => boolean {
  return (value) => (allowed as readonly unknown[]).includes(value);
}

function enumRule(field: string, allowed: readonly string[]): FieldRule {
  return { field, problem: `bad-${field}`, accepts: oneOf(allowed), message: (trait, value) => m.badEnum(trait, field, value, allowed) };
}

function checkTraitValues(values: unknown, raw: Record_, code: string, path: string, problems: ProblemList): boolean {
  if (values === undefined) return true;
  if (!Array.isArray(values)) {
    problems.error(path, 'not-a-list', m.notAList(path), undefined, code);
    return false;
  }
  const kind = raw['kind'];
  const codes = new Set<string>();
  let ok = true;
  values.forEach((value: unknown, valueIndex: number) => {
    const valuePath = `${path}[${valueIndex}]`;
    if (!isObject(value) || !isNonEmptyString(value['label'])) {
      problems.error(valuePath, 'bad-value', m.missingField(undefined, code, `values[${valueIndex}].label`), undefined, code);
      ok = false;
      return;
    }
    const valueCode = value['code'];
    const wellFormed =
      kind === 'count' ? typeof valueCode === 'string' && parseCount(valueCode) !== undefined : isNonEmptyString(valueCode) && KEBAB.test(valueCode);
    if (!wellFormed) {
      problems.error(valuePath, 'bad-value-code', kind === 'count' ? m.badCountValue(code, valueCode) : m.badCode('Value', valueCode), undefined, code);
      ok = false;
      return;
    }
    if (codes.has(valueCode as string)) {
      problems.error(valuePath, 'duplicate-value', m.duplicateValue(code, valueCode as string), undefined, code);
      ok = false;
    }
    codes.add(valueCode as string);
  });
  return ok;
}

function isCountRange(value: unknown): boolean {
  if (!isObject(value)) return false;
  const { min, max } = value;
  return Number.isInteger(min) && Number.isInteger(max) && (min as number) >= 0 && (min as number) <= (max as number) && (max as number) <= 1000;
}

/** A trait's fields after its code, checked in this order; every failure is an error and leaves the trait out. */
const TRAIT_RULES: ReadonlyArray<FieldRule | ListRule> = [
  { field: 'label', problem: 'missing-field', accepts: isNonEmptyString, message: (trait) => m.missingField(undefined, trait, 'label') },
  enumRule('part', PLANT_PARTS),
  enumRule('kind', TRAIT_KINDS),
  enumRule('season', SEASONS),
  { field: 'ease', problem: 'bad-ease', accepts: (ease) => isFiniteNumber(ease) && ease >= 1 && ease <= 5, message: (trait, ease) => m.badEase(trait, ease) },
  {
    field: 'errorRate',
    problem: 'bad-error-rate',
    accepts: (rate) => isFiniteNumber(rate) && rate >= 0 && rate < 0.5,
    message: (trait, rate) => m.badErrorRate(trait, rate),
  },
  {
    field: 'unit',
    problem: 'bad-unit',
    accepts: (unit, raw) => unit === undefined || (raw['kind'] === 'numeric' && unit === 'cm'),
    message: (trait, unit, _path, raw) => (raw['kind'] === 'numeric' ? m.badUnit(trait, unit) : m.unitOnNonNumeric(trait)),
  },
  { field: 'values', check: checkTraitValues },
  {
    field: 'values',
    problem: 'no-values',
    accepts: (values, raw) => raw['kind'] !== 'state' || (Array.isArray(values) && values.length > 0),
    message: (trait) => m.noValues(trait),
  },
  {
    field: 'countRange',
    problem: 'bad-count-range',
    accepts: (range, raw) => range === undefined || (raw['kind'] === 'count' && isCountRange(range)),
    message: (trait) => m.badCountRange(trait),
  },
  {
    field: 'appliesWhen',
    problem: 'bad-applies-when',
    accepts: (conditions) => conditions === undefined || isObject(conditions),
    message: (_trait, _value, path) => m.notAnObject(path),
  },
];

export function checkTrait(raw: unknown, index: number, problems: ProblemList, seen: Set<string>): Trait | undefined {
  const path = `traits[${index}]`;
  if (!isObject(raw)) {
    problems.error(path, 'not-an-object', m.notAnObject(path));
    return undefined;
  }
  const code = raw['code'];
  if (!isNonEmptyString(code) || !KEBAB.test(code)) {
    problems.error(`${path}.code`, 'bad-code', m.badCode('Trait', code));
    return undefined;
  }
  if (seen.has(code)) {
    problems.error(`${path}.code`, 'duplicate-trait', m.duplicate('Trait', code), undefined, code);
    return undefined;
  }
  seen.add(code);
  let ok = true;
  for (const rule of TRAIT_RULES) {
    const fieldPath = `${path}.${rule.field}`;
    const value = raw[rule.field];
    if ('check' in rule) {
      if (!rule.check(value, raw, code, fieldPath, problems)) ok = false;
    } else if (!rule.accepts(value, raw)) {
      problems.error(fieldPath, rule.problem, rule.message(code, value, fieldPath, raw), undefined, code);
      ok = false;
    }
  }
  return ok ? (raw as unknown as Trait) : undefined;
}

/** A taxon's descriptive fields after its id, checked in this order; a failure is an error, and the cells are still checked. */
const TAXON_RULES: readonly FieldRule[] = [
  { field: 'scientificName', problem: 'missing-field', accepts: isNonEmptyString, message: (taxon) => m.missingField(taxon, undefined, 'scientificName') },
  { field: 'family', problem: 'missing-field', accepts: isNonEmptyString, message: (taxon) => m.missingField(taxon, undefined, 'family') },
  {
    field: 'authority',
    problem: 'missing-field',
    accepts: (authority) => typeof authority === 'string',
    message: (taxon) => m.missingField(taxon, undefined, 'authority'),
  },
  {
    field: 'commonNames',
    problem: 'not-a-list',
    accepts: (names) => Array.isArray(names) && names.every((name) => typeof name === 'string'),
    message: (_taxon, _names, path) => m.notAList(path),
  },
  {
    field: 'status',
    problem: 'bad-status',
    accepts: (status) => status === undefined || oneOf(STATUSES)(status),
    message: (taxon, status) => m.badEnum(taxon, 'status', status, STATUSES),
  },
  {
    field: 'prior',
    problem: 'bad-prior',
    accepts: (prior) => prior === undefined || (isFiniteNumber(prior) && prior > 0),
    message: (taxon, prior) => m.badPrior(taxon, prior),
  },
];

/** Reports every failing field of a taxon's descriptive fields. */
export function checkTaxonFields(raw: Record_, path: string, id: string, problems: ProblemList): void {
  for (const rule of TAXON_RULES) {
    const fieldPath = `${path}.${rule.field}`;
    const value = raw[rule.field];
    if (!rule.accepts(value, raw)) problems.error(fieldPath, rule.problem, rule.message(id, value, fieldPath, raw), id);
  }
}
