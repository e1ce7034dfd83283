/**
 * The scoring core shared by rank and suggest: per taxon, the prior times P(observation | taxon) for
 * every observation — plain products where they cannot underflow, log sums where they could — and
 * the number of observations that conflict with the taxon's coding.
 *
 * Every observation becomes a column of small codes per taxon (a set observation's is its trait's
 * pattern column; a measurement's says where it falls) with one factor per code, and the columns are
 * combined ten or five at a time, so each taxon's score is written once per group of observations.
 *
 * Invariant: `probability` is finite, non-negative and sums to 1 over all taxa (or is empty for an
 * empty matrix); every factor is finite and > 0 (every likelihood is > 0), so no score is NaN.
 */
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, type CompiledCondition, type CompiledMatrix, type CompiledTrait } from './compiled';
import { MODEL } from './defaults';
import { EngineUsageError, usageMessages } from './errors';
import { ConflictCounts, paddedBytes, setConflictFlags, wordsOf } from './conflict-flags';
import type { PreparedMeasure, PreparedObservation, PreparedSet } from './observations';

/** Why an observation was set aside: the condition it failed and the observation that contradicts it. */
export interface SkipCause {
  condition: CompiledCondition;
  contradictedBy: PreparedSet;
}

export interface Scored {
  /**
   * Unnormalised posterior weight per taxon, higher is better: a plain product of prior and
   * likelihoods when `linear`, else its natural log (see LINEAR_SAFE_LOG).
   */
  score: Float64Array;
  linear: boolean;
  /** normalised posterior per taxon (0 where negligible; see exactProbability); empty when not asked for */
  probability: Float64Array;
  /** log scale: the largest score; linear: 0 */
  maxLog: number;
  /** log scale: log Σ exp(score − maxLog); linear: log Σ score */
  logTotal: number;
  /** linear scale: the factor that turns a score into a probability */
  scale: number;
  /** observed traits conflicting with each taxon's coding */
  conflicts: Uint8Array | Uint16Array;
  /** observations that were scored */
  active: PreparedObservation[];
  /** observation index → why it was set aside */
  skipped: Map<number, SkipCause>;
}

const defaultLogPriors = new WeakMap<CompiledMatrix, Float64Array>();

function normalisedLogs(weights: Float64Array): Float64Array {
  let total = 0;
  for (const weight of weights) total += weight;
  const logs = new Float64Array(weights.length);
  if (!(total > 0) || !Number.isFinite(total)) return logs.fill(-Math.log(Math.max(1, weights.length)));
  const logTotal = Math.log(total);
  for (let t = 0; t < weights.length; t++) logs[t] = Math.log(weights[t]) - logTotal;
  return logs;
}

function safeWeight(weight: number): number {
  return Number.isFinite(weight) && weight > MODEL.minPrior ? weight : MODEL.minPrior;
}

/** Log prior per taxon, normalised; `overrides` replace the coded priors of the named taxa. */
export function logPriors(compiled: CompiledMatrix, overrides?: Readonly<Record<string, number>>): Float64Array {
  const hasOverrides = overrides !== undefined && Object.keys(overrides).length > 0;
  if (!hasOverrides) {
    const cached = defaultLogPriors.get(compiled);
    if (cached) return cached;
  }
  const weights = Float64Array.from(compiled.priorWeight, safeWeight);
  if (hasOverrides) {
    for (const [id, weight] of Object.entries(overrides)) {
      const index = compiled.taxonIndexById.get(id);
      if (index === undefined) throw new EngineUsageError(usageMessages.unknownTaxon(id));
      weights[index] = safeWeight(weight);
    }
    return normalisedLogs(weights);
  }
  const logs = normalisedLogs(weights);
  defaultLogPriors.set(compiled, logs);
  return logs;
}

/** Observations whose appliesWhen condition is contradicted by another scored observation. */
export function findSkipped(prepared: readonly PreparedObservation[]): Map<number, SkipCause> {
  const byTrait = new Map(prepared.map((observation) => [observation.trait.index, observation]));
  const memo = new Map<number, SkipCause | null>();
  const causeOf = (observation: PreparedObservation): SkipCause | null => {
    const known = memo.get(observation.index);
    if (known !== undefined) return known;
    let cause: SkipCause | null = null;
    for (const condition of observation.trait.conditions) {
      const other = byTrait.get(condition.trait);
      if (!other || other.kind !== 'set' || causeOf(other) !== null) continue;
      if (!other.answers.some((answer) => condition.allowed.includes(answer))) {
        cause = { condition, contradictedBy: other };
        break;
      }
    }
    memo.set(observation.index, cause);
    return cause;
  };
  const skipped = new Map<number, SkipCause>();
  for (const observation of prepared) {
    const cause = causeOf(observation);
    if (cause) skipped.set(observation.index, cause);
  }
  return skipped;
}

/** Likelihood (capped at 1) and its log of a set observation for every pattern of its trait. */
export function setTables(compiled: CompiledMatrix, observation: PreparedSet): { logs: Float64Array; likelihood: Float64Array } {
  const trait = observation.trait;
  const k = trait.answerCount;
  const logs = new Float64Array(trait.patternCount);
  const likelihood = new Float64Array(trait.patternCount);
  for (let p = 0; p < trait.patternCount; p++) {
    const base = trait.likBase + p * k;
    let sum = 0;
    for (const answer of observation.answers) sum += compiled.likelihood[base + answer];
    const value = Math.min(1, sum);
    likelihood[p] = value;
    logs[p] = observation.answers.length === 1 ? compiled.logLikelihood[base + observation.answers[0]] : Math.log(value);
  }
  return { logs, likelihood };
}

/** Where a measurement falls for one taxon. */
export type MeasureRegion = 'typical' | 'extreme' | 'outside' | 'unknown' | 'inapplicable';

export function measureRegion(compiled: CompiledMatrix, observation: PreparedMeasure, t: number): MeasureRegion {
  const n = compiled.taxonCount;
  const pattern = compiled.cellPattern[observation.trait.index * n + t];
  if (pattern === UNKNOWN_PATTERN) return 'unknown';
  if (pattern === INAPPLICABLE_PATTERN) return 'inapplicable';
  const block = observation.trait.numericIndex * 4 * n;
  const x = observation.centimetres;
  const ranges = compiled.ranges;
  if (x >= ranges[block + RangeField.Low * n + t] && x <= ranges[block + RangeField.High * n + t]) return 'typical';
  if (x >= ranges[block + RangeField.Min * n + t] && x <= ranges[block + RangeField.Max * n + t]) return 'extreme';
  return 'outside';
}

/** The likelihood the scorer gives each measurement region on a trait with error rate `errorRate`. */
export function regionLikelihood(region: MeasureRegion, errorRate: number): number {
  switch (region) {
    case 'typical':
      return MODEL.typicalScore;
    case 'extreme':
      return MODEL.extremeScore;
    case 'unknown':
      return MODEL.unknownNumericScore;
    case 'outside':
    case 'inapplicable':
      return errorRate;
  }
}

/** A column of small codes per taxon and, per code, the factor it multiplies (or adds). */
export interface ScoreColumn {
  codes: Uint16Array;
  factor: Float64Array;
}

const answerFactors = new WeakMap<CompiledMatrix, Map<number, { likelihood: Float64Array; logs: Float64Array }>>();

/** The factor tables of a set observation; those of a single answer are derived once per matrix and kept with it. */
function factorTables(compiled: CompiledMatrix, observation: PreparedSet): { likelihood: Float64Array; logs: Float64Array } {
  if (observation.answers.length !== 1) return setTables(compiled, observation);
  let byKey = answerFactors.get(compiled);
  if (!byKey) {
    byKey = new Map();
    answerFactors.set(compiled, byKey);
  }
  const key = observation.trait.likBase + observation.answers[0];
  let tables = byKey.get(key);
  if (!tables) {
    tables = setTables(compiled, observation);
    byKey.set(key, tables);
  }
  return tables;
}

/** A set observation's column is its trait's pattern column; its factors are indexed by pattern. */
function setColumn(compiled: CompiledMatrix, observation: PreparedSet, linear: boolean): ScoreColumn {
  const n = compiled.taxonCount;
  const index = observation.trait.index;
  const tables = factorTables(compiled, observation);
  return { codes: compiled.cellPattern.subarray(index * n, (index + 1) * n), factor: linear ? tables.likelihood : tables.logs };
}

// measurement codes: pattern * 3 + region, rows by pattern (unknown, inapplicable, coded range),
// columns by region (typical, extreme, outside)
const MEASURE_CONFLICT = Uint8Array.from([0, 0, 0, 1, 1, 1, 0, 0, 1]);

/** Whether the low half of a 32-bit word is the first of its two 16-bit halves in memory. */
const LITTLE_ENDIAN = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;

/**
 * A measurement's column: where it falls for each taxon, as pattern * 3 + region; its conflicts are
 * added to `conflicts` on the way. Branch-free on purpose (where a measurement falls is
 * unpredictable from taxon to taxon); the range comparisons of a cell that is not a coded range are
 * made but their region is scored like the others of its row. A numeric trait's patterns are only
 * UNKNOWN_PATTERN (0), INAPPLICABLE_PATTERN (1) and CODED_RANGE_PATTERN (2).
 */
function measureColumn(compiled: CompiledMatrix, observation: PreparedMeasure, linear: boolean, codes: Uint16Array, conflicts: Uint8Array | Uint16Array): ScoreColumn {
  const n = compiled.taxonCount;
  const columnBase = observation.trait.index * n;
  const block = observation.trait.numericIndex * 4 * n;
  const minBase = block + RangeField.Min * n;
  const lowBase = block + RangeField.Low * n;
  const highBase = block + RangeField.High * n;
  const maxBase = block + RangeField.Max * n;
  const x = observation.centimetres;
  const patterns = compiled.cellPattern;
  const ranges = compiled.ranges;
  // compiled ranges are ordered (min ≤ low ≤ high ≤ max), so the four comparisons that hold are
  // 4 inside the typical range, 3 inside the recorded one only, 2 outside: region = 4 − held
  const patternOffset = patterns.byteOffset + columnBase * 2;
  if (LITTLE_ENDIAN && n % 2 === 0 && n >= 64 && conflicts instanceof Uint8Array && patternOffset % 4 === 0 && codes.byteOffset % 4 === 0 && conflicts.byteOffset % 2 === 0) {
    // two taxa per step: their patterns and codes as one 32-bit word, their conflicts as one 16-bit
    // addition (counts stay below 256, so no byte carries into the next)
    const pairs = n >>> 1;
    const patternPairs = new Int32Array(patterns.buffer, patternOffset, pairs);
    const codePairs = new Int32Array(codes.buffer, codes.byteOffset, pairs);
    const conflictPairs = new Uint16Array(conflicts.buffer, conflicts.byteOffset, pairs);
    for (let i = 0; i < pairs; i++) {
      const t = i << 1;
      const both = patternPairs[i];
      const held0 = +(x >= ranges[minBase + t]) + +(x >= ranges[lowBase + t]) + +(x <= ranges[highBase + t]) + +(x <= ranges[maxBase + t]);
      const held1 = +(x >= ranges[minBase + t + 1]) + +(x >= ranges[lowBase + t + 1]) + +(x <= ranges[highBase + t + 1]) + +(x <= ranges[maxBase + t + 1]);
      const code0 = (both & 0xffff) * 3 + 4 - held0;
      const code1 = (both >>> 16) * 3 + 4 - held1;
      codePairs[i] = code0 | (code1 << 16);
      conflictPairs[i] += MEASURE_CONFLICT[code0] | (MEASURE_CONFLICT[code1] << 8);
    }
  } else {
    for (let t = 0; t < n; t++) {
      const held = +(x >= ranges[minBase + t]) + +(x >= ranges[lowBase + t]) + +(x <= ranges[highBase + t]) + +(x <= ranges[maxBase + t]);
      const code = patterns[columnBase + t] * 3 + 4 - held;
      codes[t] = code;
      conflicts[t] += MEASURE_CONFLICT[code];
    }
  }
  const factors = measureFactors(observation.trait);
  return { codes, factor: linear ? factors.likelihood : factors.logs };
}

const traitMeasureFactors = new WeakMap<CompiledTrait, { likelihood: Float64Array; logs: Float64Array }>();

/** A numeric trait's factor per measurement code, plain and as logs; built once per trait. */
function measureFactors(trait: CompiledTrait): { likelihood: Float64Array; logs: Float64Array } {
  let factors = traitMeasureFactors.get(trait);
  if (!factors) {
    const e = trait.errorRate;
    const u = MODEL.unknownNumericScore;
    const likelihood = Float64Array.of(u, u, u, e, e, e, MODEL.typicalScore, MODEL.extremeScore, e);
    factors = { likelihood, logs: likelihood.map(Math.log) };
    traitMeasureFactors.set(trait, factors);
  }
  return factors;
}

/** A column of unknown cells per matrix, shared by every ranking (it is only ever read). */
const unknownColumns = new WeakMap<CompiledMatrix, Uint16Array>();

function unknownColumnOf(compiled: CompiledMatrix): Uint16Array {
  let column = unknownColumns.get(compiled);
  if (!column) {
    column = new Uint16Array(compiled.taxonCount);
    unknownColumns.set(compiled, column);
  }
  return column;
}

/** The code columns of one pass (read once per pass, not per taxon). */
function codesOf(columns: readonly ScoreColumn[], o: number, count: number): Uint16Array[] {
  return columns.slice(o, o + count).map((column) => column.codes);
}

/** The factor tables of one pass. */
function factorsOf(columns: readonly ScoreColumn[], o: number, count: number): Float64Array[] {
  return columns.slice(o, o + count).map((column) => column.factor);
}

/** Ten columns into the scores in one pass: score = from × (or +) their ten factors. Exported for tests. */
export function addTen(columns: readonly ScoreColumn[], o: number, from: Float64Array, score: Float64Array, linear: boolean): void {
  const [c0, c1, c2, c3, c4, c5, c6, c7, c8, c9] = codesOf(columns, o, 10);
  const [v0, v1, v2, v3, v4, v5, v6, v7, v8, v9] = factorsOf(columns, o, 10);
  const n = score.length;
  // two copies of one loop, so neither branches on the scale per taxon
  if (linear) {
    for (let t = 0; t < n; t++) score[t] = from[t] * (v0[c0[t]] * v1[c1[t]] * v2[c2[t]] * v3[c3[t]] * v4[c4[t]] * v5[c5[t]] * v6[c6[t]] * v7[c7[t]] * v8[c8[t]] * v9[c9[t]]);
  } else {
    for (let t = 0; t < n; t++) score[t] = from[t] + (v0[c0[t]] + v1[c1[t]] + v2[c2[t]] + v3[c3[t]] + v4[c4[t]] + v5[c5[t]] + v6[c6[t]] + v7[c7[t]] + v8[c8[t]] + v9[c9[t]]);
  }
}

/**
 * addTen for plain products, two taxa per step: each column is read as 32-bit words holding the
 * codes of taxa 2i (low half) and 2i + 1 (high half), halving the reads and their bounds checks.
 * Gives exactly addTen's products. Needs an even taxon count and word-aligned columns. Exported for tests.
 */
export function addTenByPairs(columns: readonly ScoreColumn[], o: number, from: Float64Array, score: Float64Array): void {
  const [c0, c1, c2, c3, c4, c5, c6, c7, c8, c9] = codesOf(columns, o, 10).map(pairsOf);
  const [v0, v1, v2, v3, v4, v5, v6, v7, v8, v9] = factorsOf(columns, o, 10);
  const m = c0.length;
  for (let i = 0; i < m; i++) {
    const a0 = c0[i];
    const a1 = c1[i];
    const a2 = c2[i];
    const a3 = c3[i];
    const a4 = c4[i];
    const a5 = c5[i];
    const a6 = c6[i];
    const a7 = c7[i];
    const a8 = c8[i];
    const a9 = c9[i];
    const t = i << 1;
    score[t] = from[t] * (v0[a0 & 0xffff] * v1[a1 & 0xffff] * v2[a2 & 0xffff] * v3[a3 & 0xffff] * v4[a4 & 0xffff] * v5[a5 & 0xffff] * v6[a6 & 0xffff] * v7[a7 & 0xffff] * v8[a8 & 0xffff] * v9[a9 & 0xffff]);
    score[t + 1] = from[t + 1] * (v0[a0 >>> 16] * v1[a1 >>> 16] * v2[a2 >>> 16] * v3[a3 >>> 16] * v4[a4 >>> 16] * v5[a5 >>> 16] * v6[a6 >>> 16] * v7[a7 >>> 16] * v8[a8 >>> 16] * v9[a9 >>> 16]);
  }
}

/** A code column as 32-bit words, two taxa each (see addTenByPairs). */
function pairsOf(codes: Uint16Array): Int32Array {
  return new Int32Array(codes.buffer, codes.byteOffset, codes.length >>> 1);
}

/** Whether addTenByPairs can read these columns: an even count of taxa, enough of them to pay for the views, aligned words. */
function pairable(columns: readonly ScoreColumn[], o: number, n: number): boolean {
  if (!LITTLE_ENDIAN || n % 2 !== 0 || n < 64) return false;
  for (let k = o; k < o + 10; k++) if (columns[k].codes.byteOffset % 4 !== 0) return false;
  return true;
}

/** Five columns into the scores in one pass: score = from × (or +) their five factors. */
function addFive(columns: readonly ScoreColumn[], o: number, from: Float64Array, score: Float64Array, linear: boolean): void {
  const [c0, c1, c2, c3, c4] = codesOf(columns, o, 5);
  const [v0, v1, v2, v3, v4] = factorsOf(columns, o, 5);
  const n = score.length;
  if (linear) {
    for (let t = 0; t < n; t++) score[t] = from[t] * (v0[c0[t]] * v1[c1[t]] * v2[c2[t]] * v3[c3[t]] * v4[c4[t]]);
  } else {
    for (let t = 0; t < n; t++) score[t] = from[t] + (v0[c0[t]] + v1[c1[t]] + v2[c2[t]] + v3[c3[t]] + v4[c4[t]]);
  }
}

/**
 * Writes `score` = `start` combined with every column, in as few passes over the taxa as possible:
 * ten columns at a time, then five (a short last group is padded with a column of unknown cells
 * that adds nothing), so each taxon's running score is read and written once per group instead of
 * once per observation. Multiplies plain likelihoods when `linear`, else adds their logs.
 */
function addColumns(compiled: CompiledMatrix, columns: ScoreColumn[], start: Float64Array, score: Float64Array, linear: boolean): void {
  if (columns.length === 0) {
    score.set(start);
    return;
  }
  const tail = columns.length % 10;
  const padding = tail === 0 ? 0 : (5 - (tail % 5)) % 5;
  if (padding > 0) {
    const nothing: ScoreColumn = { codes: unknownColumnOf(compiled), factor: new Float64Array([linear ? 1 : 0]) };
    columns = [...columns, ...Array.from({ length: padding }, () => nothing)];
  }
  let from = start;
  let o = 0;
  for (; o + 10 <= columns.length; o += 10) {
    if (linear && pairable(columns, o, score.length)) addTenByPairs(columns, o, from, score);
    else addTen(columns, o, from, score, linear);
    from = score;
  }
  for (; o < columns.length; o += 5) {
    addFive(columns, o, from, score, linear);
    from = score;
  }
}

/** Log weights more than this far below the best contribute less than 2e-16 of it each and are not exponentiated. */
const NEGLIGIBLE_LOG_GAP = 36;

/** The largest log weight and the log of Σ exp(weight − largest): all a ranking needs to normalise. */
export function logNormaliser(logWeights: Float64Array): { maxLog: number; logTotal: number } {
  const n = logWeights.length;
  if (n === 0) return { maxLog: 0, logTotal: 0 };
  let max = -Infinity;
  for (let t = 0; t < n; t++) if (logWeights[t] > max) max = logWeights[t];
  if (!Number.isFinite(max)) return { maxLog: 0, logTotal: Math.log(n) };
  const floor = max - NEGLIGIBLE_LOG_GAP;
  let total = 0;
  for (let t = 0; t < n; t++) {
    const log = logWeights[t];
    if (log >= floor) total += Math.exp(log - max);
  }
  return { maxLog: max, logTotal: Math.log(total) };
}

/**
 * Probabilities that sum to 1 (max-shifted, so nothing overflows); weights more than
 * NEGLIGIBLE_LOG_GAP below the best are 0 here, and `exactProbability` recovers their tiny values.
 */
export function normalise(logWeights: Float64Array, normaliser = logNormaliser(logWeights)): Float64Array {
  const { maxLog, logTotal } = normaliser;
  const n = logWeights.length;
  const probability = new Float64Array(n);
  let anyFinite = false;
  for (const log of logWeights) if (Number.isFinite(log)) anyFinite = true;
  if (!anyFinite) return probability.fill(1 / Math.max(1, n));
  const floor = maxLog - NEGLIGIBLE_LOG_GAP;
  const shift = maxLog + logTotal;
  for (let t = 0; t < n; t++) if (logWeights[t] >= floor) probability[t] = Math.exp(logWeights[t] - shift);
  return probability;
}

/** The probability of one taxon, exact even where `normalise` left a negligible weight at 0. */
export function exactProbability(scored: Scored, t: number): number {
  if (scored.linear) return Math.min(1, scored.score[t] * scored.scale);
  return Math.min(1, Math.exp(scored.score[t] - scored.maxLog - scored.logTotal));
}

/** Normalised prior weights (linear), cached like the log priors. */
const defaultPriorWeights = new WeakMap<CompiledMatrix, Float64Array>();

function priorWeights(compiled: CompiledMatrix, priors: Readonly<Record<string, number>> | undefined, logs: Float64Array): Float64Array {
  const custom = priors !== undefined && Object.keys(priors).length > 0;
  const cached = custom ? undefined : defaultPriorWeights.get(compiled);
  if (cached) return cached;
  const weights = Float64Array.from(logs, Math.exp);
  if (!custom) defaultPriorWeights.set(compiled, weights);
  return weights;
}

/**
 * The smallest log weight any taxon could reach. Above LINEAR_SAFE_LOG the posterior weights are
 * also kept as plain products, which normalise without a Math.exp per taxon; below it they could
 * underflow, and the log sums alone are normalised.
 */
function lowestPossibleLog(compiled: CompiledMatrix, active: readonly PreparedObservation[], logPrior: Float64Array): number {
  let lowest = smallestOf(logPrior);
  for (const observation of active) {
    if (observation.kind === 'measure') {
      lowest += Math.log(Math.min(MODEL.extremeScore, MODEL.unknownNumericScore, observation.trait.errorRate));
      continue;
    }
    lowest += smallestLogLikelihoods(compiled)[observation.trait.index];
  }
  return lowest;
}

const smallestPriors = new WeakMap<Float64Array, number>();

/** The smallest log prior (capped at 0); remembered for the cached default priors. */
function smallestOf(logPrior: Float64Array): number {
  const known = smallestPriors.get(logPrior);
  if (known !== undefined) return known;
  let lowest = 0;
  for (const log of logPrior) if (log < lowest) lowest = log;
  smallestPriors.set(logPrior, lowest);
  return lowest;
}

const smallestLogs = new WeakMap<CompiledMatrix, Float64Array>();

/** Per trait, log of the smallest P(value | pattern) of any value and pattern (capped at 0); computed once per matrix. */
function smallestLogLikelihoods(compiled: CompiledMatrix): Float64Array {
  let logs = smallestLogs.get(compiled);
  if (logs) return logs;
  logs = new Float64Array(compiled.traits.length);
  for (const trait of compiled.traits) {
    let smallest = Infinity;
    const end = trait.likBase + trait.patternCount * trait.answerCount;
    for (let i = trait.likBase; i < end; i++) if (compiled.likelihood[i] < smallest) smallest = compiled.likelihood[i];
    logs[trait.index] = Math.log(Math.min(1, smallest));
  }
  smallestLogs.set(compiled, logs);
  return logs;
}

const LINEAR_SAFE_LOG = -600;

/**
 * Per-taxon working arrays of one matrix, reused by every ranking of it instead of allocating
 * fresh ones per call.
 *
 * Invariant: the engine is synchronous and single-threaded, and a scoring that uses the scratch
 * finishes (and its caller has read everything it needs from the Scored) before the next scoring
 * of the same matrix can start; nothing that holds on to a Scored past its call (suggest, anything
 * returning probabilities) may use it. A Worker gets its own module instance, hence its own scratch.
 */
export interface ScoringScratch {
  score: Float64Array;
  conflicts8: Uint8Array;
  /** conflicts8 four taxa per word */
  conflictWords: Int32Array;
  conflicts16: Uint16Array | undefined;
  /** one code column per measurement, grown as needed */
  measureCodes: Uint16Array[];
  /** one flag column (four taxa per word) per set observation with several answers, grown as needed */
  flags: Int32Array[];
}

const scratches = new WeakMap<CompiledMatrix, ScoringScratch>();

export function scoringScratch(compiled: CompiledMatrix): ScoringScratch {
  let scratch = scratches.get(compiled);
  if (!scratch) {
    const n = compiled.taxonCount;
    const conflicts8 = paddedBytes(n);
    scratch = { score: new Float64Array(n), conflicts8, conflictWords: wordsOf(conflicts8), conflicts16: undefined, measureCodes: [], flags: [] };
    scratches.set(compiled, scratch);
  }
  return scratch;
}

export interface ScoringOptions {
  /** also fill `probability` (default true) */
  withProbabilities?: boolean;
  /** reuse these arrays (see ScoringScratch) */
  scratch?: ScoringScratch;
  /** keep log sums even where plain products would be safe (to check one against the other) */
  forceLogs?: boolean;
  /**
   * Leave the total of plain products to the caller, who reads every score anyway and must then call
   * setLinearTotal (only with withProbabilities false; log sums are always normalised here).
   */
  totalByCaller?: boolean;
}

/**
 * Scores prepared observations against every taxon. Where no taxon's weight can fall below
 * e^LINEAR_SAFE_LOG the weights are plain products, normalised without a Math.exp per taxon;
 * otherwise they are log sums. With a `scratch`, the returned arrays are the scratch's and only
 * valid until the next scoring with it (see ScoringScratch); without, they are fresh.
 */
export function scoreObservations(compiled: CompiledMatrix, prepared: readonly PreparedObservation[], priors?: Readonly<Record<string, number>>, options: ScoringOptions = {}): Scored {
  const { withProbabilities = true, scratch, forceLogs = false, totalByCaller = false } = options;
  if (totalByCaller && withProbabilities) throw new EngineUsageError(usageMessages.badOption('totalByCaller', true, 'used only without probabilities'));
  const n = compiled.taxonCount;
  const logPrior = logPriors(compiled, priors);
  const skipped = findSkipped(prepared);
  const active = prepared.filter((observation) => !skipped.has(observation.index));
  const linear = !forceLogs && lowestPossibleLog(compiled, active, logPrior) > LINEAR_SAFE_LOG;
  const start = linear ? priorWeights(compiled, priors, logPrior) : logPrior;
  let score: Float64Array;
  let conflicts: Uint8Array | Uint16Array;
  // one byte per taxon is enough below 256 observations, and halves the traffic of counting
  const narrow = prepared.length < 256;
  if (scratch) {
    score = scratch.score;
    if (narrow) conflicts = scratch.conflicts8.fill(0);
    else conflicts = (scratch.conflicts16 ??= new Uint16Array(n)).fill(0);
  } else {
    score = new Float64Array(n);
    conflicts = narrow ? paddedBytes(n) : new Uint16Array(n);
  }
  const counter = new ConflictCounts(conflicts, scratch && conflicts === scratch.conflicts8 ? scratch.conflictWords : undefined);
  const words = Math.ceil(n / 4);
  let measures = 0;
  let flagColumns = 0;
  const nextFlags = (): Int32Array => {
    const flags = scratch ? (scratch.flags[flagColumns] ??= new Int32Array(words)) : new Int32Array(words);
    flagColumns++;
    return flags;
  };
  const columns: ScoreColumn[] = [];
  for (const observation of active) {
    if (observation.kind === 'set') {
      columns.push(setColumn(compiled, observation, linear));
      counter.add(setConflictFlags(compiled, observation, nextFlags));
      continue;
    }
    const codes = scratch ? (scratch.measureCodes[measures] ??= new Uint16Array(n)) : new Uint16Array(n);
    measures++;
    columns.push(measureColumn(compiled, observation, linear, codes, conflicts));
  }
  counter.flush();
  addColumns(compiled, columns, start, score, linear);
  const scored: Scored = { score, linear, probability: new Float64Array(0), maxLog: 0, logTotal: 0, scale: 1, conflicts, active, skipped };
  if (linear && n > 0) {
    if (totalByCaller) return scored;
    let total = 0;
    for (let t = 0; t < n; t++) total += score[t];
    setLinearTotal(scored, total);
    if (withProbabilities) {
      // the scores become the probabilities; the order of taxa and exactProbability are unchanged
      probabilitiesInPlace(scored);
    }
    return scored;
  }
  const normaliser = logNormaliser(score);
  scored.maxLog = normaliser.maxLog;
  scored.logTotal = normaliser.logTotal;
  if (withProbabilities) scored.probability = normalise(score, normaliser);
  return scored;
}

/** Completes a linear scoring whose total the caller summed (see ScoringOptions.totalByCaller). */
export function setLinearTotal(scored: Scored, total: number): void {
  scored.logTotal = Math.log(total);
  scored.scale = 1 / total;
}

function probabilitiesInPlace(scored: Scored): void {
  const { score, scale } = scored;
  for (let t = 0; t < score.length; t++) score[t] *= scale;
  scored.scale = 1;
  scored.probability = score;
}
