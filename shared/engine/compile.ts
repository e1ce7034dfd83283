/**
 * compileMatrix: turns a validated matrix document into typed arrays, once per edition.
 *
 * Invariant: compilation is a pure function of the document; the same document always yields
 * byte-identical arrays (so bundles are reproducible and rankings do not depend on load order).
 */
import {
  CODED_RANGE_PATTERN,
  INAPPLICABLE_PATTERN,
  RangeField,
  UNKNOWN_PATTERN,
  ValueStatus,
  type CompiledCondition,
  type CompiledMatrix,
  type CompiledTrait,
  type TaxonInfo,
} from './compiled-matrix';
import { countSpanOf, parseCount } from './count-span';
import { MODEL } from './defaults';
import { MatrixValidationError, matrixMessages } from './errors';
import type { DiscreteCell, MatrixDocument, NumericCell, Taxon, Trait } from './types';
import { validateMatrix } from './validate';

const FREQUENCY_STATUS = [ValueStatus.Usual, ValueStatus.Occasional, ValueStatus.Rare] as const;
const FREQUENCY_WEIGHT = [MODEL.usualWeight, MODEL.occasionalWeight, MODEL.rareWeight] as const;
const MAX_PATTERNS = 65535;

function clampErrorRate(rate: number): number {
  return Math.min(MODEL.maxErrorRate, Math.max(MODEL.minErrorRate, rate));
}

function compileTraitHeader(trait: Trait, index: number, taxa: readonly Taxon[], numericIndex: number): CompiledTrait {
  let answerCodes: Array<string | number> = [];
  let answerLabels: string[] = [];
  let countMin = 0;
  if (trait.kind === 'state') {
    answerCodes = (trait.values ?? []).map((value) => value.code);
    answerLabels = (trait.values ?? []).map((value) => value.label);
  } else if (trait.kind === 'count') {
    const span = countSpanOf(trait, taxa) ?? { min: 0, max: 0 };
    countMin = span.min;
    const labels = new Map((trait.values ?? []).map((value) => [parseCount(value.code), value.label]));
    for (let count = span.min; count <= span.max; count++) {
      answerCodes.push(count);
      answerLabels.push(labels.get(count) ?? String(count));
    }
  }
  const answerCount = answerCodes.length;
  return {
    index,
    code: trait.code,
    label: trait.label,
    part: trait.part,
    kind: trait.kind,
    ...(trait.kind === 'numeric' && { unit: 'cm' as const }),
    season: trait.season,
    ease: trait.ease,
    codedErrorRate: trait.errorRate,
    errorRate: clampErrorRate(trait.errorRate),
    ...(trait.help !== undefined && { help: trait.help }),
    values: trait.values ?? [],
    answerCodes,
    answerLabels,
    answerCount,
    countMin,
    words: Math.max(1, Math.ceil(answerCount / 32)),
    ...(trait.appliesWhen !== undefined && { appliesWhen: trait.appliesWhen }),
    conditions: [],
    patternCount: trait.kind === 'numeric' ? 3 : 2,
    maskBase: 0,
    likBase: 0,
    numericIndex,
    bandCuts: [],
  };
}

/** Value index of a coded value, or -1. */
function answerIndex(trait: CompiledTrait, value: string | number, codeIndex: Map<string, number>): number {
  if (trait.kind === 'count') {
    const count = parseCount(value);
    if (count === undefined) return -1;
    const index = count - trait.countMin;
    return index >= 0 && index < trait.answerCount ? index : -1;
  }
  return typeof value === 'string' ? (codeIndex.get(value) ?? -1) : -1;
}

interface PatternBuild {
  trait: CompiledTrait;
  keys: Map<string | number, number>;
  /** masks of patterns 0, 1, 2… (3 × words each); 0 and 1 stay empty */
  masks: number[];
  codeIndex: Map<string, number>;
  scratch: Uint32Array;
}

function cellKey(scratch: Uint32Array, trait: CompiledTrait): string | number {
  if (trait.words === 1 && trait.answerCount <= 17) return scratch[0] + scratch[1] * 2 ** 17 + scratch[2] * 2 ** 34;
  return scratch.join(',');
}

function newPatternBuild(trait: CompiledTrait): PatternBuild {
  return {
    trait,
    keys: new Map(),
    masks: new Array<number>(6 * trait.words).fill(0),
    codeIndex: new Map(trait.answerCodes.map((code, index) => [String(code), index])),
    scratch: new Uint32Array(3 * trait.words),
  };
}

/** The pattern id of one coded discrete cell, adding the pattern when it is new. */
function discretePattern(build: PatternBuild, cell: DiscreteCell): number {
  const { trait, scratch } = build;
  const words = trait.words;
  scratch.fill(0);
  const lists = [cell.usual, cell.occasional, cell.rare];
  let listed = 0;
  for (let f = 0; f < 3; f++) {
    const values = lists[f];
    if (!values) continue;
    for (const value of values) {
      const index = answerIndex(trait, value, build.codeIndex);
      if (index < 0) continue;
      scratch[f * words + (index >>> 5)] |= 1 << (index & 31);
      listed++;
    }
  }
  if (listed === 0) return UNKNOWN_PATTERN;
  const key = cellKey(scratch, trait);
  let id = build.keys.get(key);
  if (id === undefined) {
    id = build.keys.size + 2;
    if (id > MAX_PATTERNS) {
      throw new MatrixValidationError([
        { severity: 'error', code: 'too-many-patterns', path: `traits.${trait.code}`, trait: trait.code, message: matrixMessages.tooManyPatterns(trait.code) },
      ]);
    }
    build.keys.set(key, id);
    for (const word of scratch) build.masks.push(word);
  }
  return id;
}

function storeRange(compiled: CompiledMatrix, trait: CompiledTrait, taxonId: string, t: number, range: NumericCell): void {
  const n = compiled.taxonCount;
  const block = trait.numericIndex * 4 * n;
  let { min, low, high, max } = range;
  if (!(min <= low && low <= high && high <= max)) {
    [min, low, high, max] = [min, low, high, max].sort((a, b) => a - b);
    compiled.rangesOutOfOrder.push({ taxon: taxonId, trait: trait.code, cell: { min: range.min, low: range.low, high: range.high, max: range.max } });
  }
  compiled.ranges[block + RangeField.Min * n + t] = min;
  compiled.ranges[block + RangeField.Low * n + t] = low;
  compiled.ranges[block + RangeField.High * n + t] = high;
  compiled.ranges[block + RangeField.Max * n + t] = max;
}

/**
 * Fills `cellPattern` and `ranges` taxon by taxon (walking each taxon's own cells is much faster than
 * looking every trait up in every taxon); cells left out stay 0, which is UNKNOWN_PATTERN.
 */
function compileCells(compiled: CompiledMatrix, taxa: readonly Taxon[]): PatternBuild[] {
  const n = compiled.taxonCount;
  const builds = compiled.traits.map((trait) => (trait.kind === 'numeric' ? undefined : newPatternBuild(trait)));
  for (let t = 0; t < n; t++) {
    const cells = taxa[t].cells;
    for (const code in cells) {
      const j = compiled.traitIndexByCode.get(code) as number;
      const cell = cells[code];
      let pattern: number;
      if (cell === 'unknown') pattern = UNKNOWN_PATTERN;
      else if (cell === 'inapplicable') pattern = INAPPLICABLE_PATTERN;
      else {
        const build = builds[j];
        if (build) pattern = discretePattern(build, cell as DiscreteCell);
        else {
          storeRange(compiled, compiled.traits[j], taxa[t].id, t, cell as NumericCell);
          pattern = CODED_RANGE_PATTERN;
        }
      }
      compiled.cellPattern[j * n + t] = pattern;
    }
  }
  for (const build of builds) if (build) build.trait.patternCount = build.keys.size + 2;
  return builds.filter((build): build is PatternBuild => build !== undefined);
}

function popcount(word: number): number {
  let bits = word - ((word >>> 1) & 0x55555555);
  bits = (bits & 0x33333333) + ((bits >>> 2) & 0x33333333);
  return (((bits + (bits >>> 4)) & 0x0f0f0f0f) * 0x01010101) >>> 24;
}

/** Fills likelihood, log-likelihood and status tables of one discrete trait. */
function fillLikelihoods(trait: CompiledTrait, masks: Uint32Array, likelihood: Float64Array, logLikelihood: Float64Array, status: Uint8Array): void {
  const k = trait.answerCount;
  const words = trait.words;
  const e = trait.errorRate;
  const spread = e / Math.max(1, k - 1);
  for (let p = 0; p < trait.patternCount; p++) {
    const base = trait.likBase + p * k;
    if (p === UNKNOWN_PATTERN || p === INAPPLICABLE_PATTERN) {
      const value = p === UNKNOWN_PATTERN ? 1 / k : spread;
      for (let v = 0; v < k; v++) {
        likelihood[base + v] = value;
        logLikelihood[base + v] = Math.log(value);
        status[base + v] = p === UNKNOWN_PATTERN ? ValueStatus.Unknown : ValueStatus.Inapplicable;
      }
      continue;
    }
    const maskOffset = trait.maskBase + p * 3 * words;
    let total = 0;
    for (let f = 0; f < 3; f++) {
      let bits = 0;
      for (let w = 0; w < words; w++) bits += popcount(masks[maskOffset + f * words + w]);
      total += bits * FREQUENCY_WEIGHT[f];
    }
    for (let v = 0; v < k; v++) {
      let valueStatus: number = ValueStatus.NotCoded;
      let weight = 0;
      for (let f = 0; f < 3; f++) {
        if ((masks[maskOffset + f * words + (v >>> 5)] & (1 << (v & 31))) !== 0) {
          valueStatus = FREQUENCY_STATUS[f];
          weight = FREQUENCY_WEIGHT[f];
          break;
        }
      }
      const share = total > 0 ? weight / total : 0;
      const value = k === 1 ? (weight > 0 ? 1 - e : e) : (1 - e) * share + spread * (1 - share);
      likelihood[base + v] = value;
      logLikelihood[base + v] = Math.log(value);
      status[base + v] = valueStatus;
    }
  }
}

/** Rounds a cut point to two significant digits so band labels read naturally ("< 8.5 cm"). */
function roundCut(value: number): number {
  if (value <= 0) return 0;
  const magnitude = 10 ** (Math.floor(Math.log10(value)) - 1);
  return Math.round(value / magnitude) * magnitude;
}

/** Cut points at the quantiles of the coded typical-range midpoints. */
export function bandCutsFrom(midpoints: number[], bands: number): number[] {
  if (midpoints.length < 2) return [];
  const sorted = [...midpoints].sort((a, b) => a - b);
  const cuts: number[] = [];
  for (let b = 1; b < bands; b++) {
    const at = sorted[Math.min(sorted.length - 1, Math.floor((b * sorted.length) / bands))];
    const cut = roundCut(at);
    if (cut > sorted[0] && cut <= sorted[sorted.length - 1] && !cuts.includes(cut)) cuts.push(cut);
  }
  return cuts.sort((a, b) => a - b);
}

function numericBandCuts(trait: CompiledTrait, column: Uint16Array, columnBase: number, ranges: Float64Array, n: number): number[] {
  const block = trait.numericIndex * 4 * n;
  const midpoints: number[] = [];
  for (let t = 0; t < n; t++) {
    if (column[columnBase + t] !== CODED_RANGE_PATTERN) continue;
    midpoints.push((ranges[block + RangeField.Low * n + t] + ranges[block + RangeField.High * n + t]) / 2);
  }
  return bandCutsFrom(midpoints, MODEL.numericBands);
}

/** Traits ordered so that every trait comes after the traits its appliesWhen names. */
function dependencyOrder(traits: readonly CompiledTrait[]): CompiledTrait[] {
  const ordered: CompiledTrait[] = [];
  const placed = new Set<number>();
  const place = (trait: CompiledTrait): void => {
    if (placed.has(trait.index)) return;
    placed.add(trait.index);
    for (const condition of trait.conditions) place(traits[condition.trait]);
    ordered.push(trait);
  };
  traits.forEach(place);
  return ordered;
}

function resolveConditions(traits: CompiledTrait[], byCode: Map<string, number>): void {
  for (const trait of traits) {
    if (!trait.appliesWhen) continue;
    const conditions: CompiledCondition[] = [];
    for (const [otherCode, allowed] of Object.entries(trait.appliesWhen)) {
      const other = traits[byCode.get(otherCode) as number];
      const codeIndex = new Map(other.answerCodes.map((code, index) => [String(code), index]));
      conditions.push({ trait: other.index, allowed: allowed.map((value) => answerIndex(other, value, codeIndex)).filter((index) => index >= 0) });
    }
    trait.conditions = conditions;
  }
}

/** True when the taxon's effective coding of the condition trait shows none of the allowed values. */
function isOutside(compiled: CompiledMatrix, condition: CompiledCondition, t: number): boolean {
  const other = compiled.traits[condition.trait];
  const pattern = compiled.cellPattern[other.index * compiled.taxonCount + t];
  if (pattern === INAPPLICABLE_PATTERN) return true;
  if (pattern === UNKNOWN_PATTERN) return false;
  const offset = other.maskBase + pattern * 3 * other.words;
  for (const value of condition.allowed) {
    const word = value >>> 5;
    const bit = 1 << (value & 31);
    for (let f = 0; f < 3; f++) if ((compiled.masks[offset + f * other.words + word] & bit) !== 0) return false;
  }
  return true;
}

/** Cells of taxa coded outside a trait's condition are scored as inapplicable; the coded pattern is kept aside. */
function applyConditions(compiled: CompiledMatrix): void {
  const n = compiled.taxonCount;
  const overrides: Array<[number, number]> = [];
  for (const trait of dependencyOrder(compiled.traits)) {
    if (trait.conditions.length === 0) continue;
    const base = trait.index * n;
    for (let t = 0; t < n; t++) {
      const coded = compiled.cellPattern[base + t];
      if (coded === INAPPLICABLE_PATTERN) continue;
      if (trait.conditions.some((condition) => isOutside(compiled, condition, t))) {
        compiled.cellPattern[base + t] = INAPPLICABLE_PATTERN;
        overrides.push([base + t, coded]);
      }
    }
  }
  overrides.sort((a, b) => a[0] - b[0]);
  compiled.overrideKeys = Uint32Array.from(overrides, ([key]) => key);
  compiled.overrideCoded = Uint16Array.from(overrides, ([, coded]) => coded);
}

/**
 * Compiles a matrix document. Throws MatrixValidationError (with every problem) when the document
 * has errors; warnings are kept in `compiled.warnings` and repaired (ranges sorted, empty cells unknown).
 */
export function compileMatrix(doc: MatrixDocument): CompiledMatrix {
  const problems = validateMatrix(doc);
  if (problems.some((problem) => problem.severity === 'error')) throw new MatrixValidationError(problems);
  const taxa = doc.taxa;
  const n = taxa.length;
  let numericCount = 0;
  const traits = doc.traits.map((trait, index) => compileTraitHeader(trait, index, taxa, trait.kind === 'numeric' ? numericCount++ : -1));
  const traitIndexByCode = new Map(traits.map((trait) => [trait.code, trait.index]));
  resolveConditions(traits, traitIndexByCode);

  const cellPattern = new Uint16Array(traits.length * n);
  const ranges = new Float64Array(numericCount * 4 * n);
  const compiled: CompiledMatrix = {
    format: 'sylvasift-compiled',
    version: 1,
    title: doc.title,
    ...(doc.region !== undefined && { region: doc.region }),
    taxa: taxa.map(({ cells: _cells, ...info }): TaxonInfo => info),
    traits,
    taxonCount: n,
    priorWeight: Float64Array.from(taxa, (taxon) => taxon.prior ?? 1),
    cellPattern,
    masks: new Uint32Array(0),
    likelihood: new Float64Array(0),
    logLikelihood: new Float64Array(0),
    valueStatus: new Uint8Array(0),
    ranges,
    overrideKeys: new Uint32Array(0),
    overrideCoded: new Uint16Array(0),
    rangesOutOfOrder: [],
    warnings: problems,
    inseparable: doc.inseparable ?? [],
    taxonIndexById: new Map(taxa.map((taxon, index) => [taxon.id, index])),
    traitIndexByCode,
  };

  const builds = compileCells(compiled, taxa);
  let maskTotal = 0;
  let likTotal = 0;
  for (const build of builds) {
    build.trait.maskBase = maskTotal;
    maskTotal += build.masks.length;
    build.trait.likBase = likTotal;
    likTotal += build.trait.patternCount * build.trait.answerCount;
  }
  for (const trait of traits) {
    if (trait.kind === 'numeric') trait.bandCuts = numericBandCuts(trait, cellPattern, trait.index * n, ranges, n);
  }
  const masks = new Uint32Array(maskTotal);
  for (const build of builds) masks.set(build.masks, build.trait.maskBase);
  compiled.masks = masks;
  compiled.likelihood = new Float64Array(likTotal);
  compiled.logLikelihood = new Float64Array(likTotal);
  compiled.valueStatus = new Uint8Array(likTotal);
  for (const trait of traits) {
    if (trait.kind !== 'numeric') fillLikelihoods(trait, masks, compiled.likelihood, compiled.logLikelihood, compiled.valueStatus);
  }
  applyConditions(compiled);
  return compiled;
}
