/**
 * The scoring core shared by rank and suggest: log-space sums of P(observation | taxon).
 *
 * Invariant: `probability` is finite, non-negative and sums to 1 over all taxa (or is empty for an
 * empty matrix); every log term added is finite because every likelihood is > 0.
 */
import { CODED_RANGE_PATTERN, INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, ValueStatus, type CompiledCondition, type CompiledMatrix } from './compiled';
import { MODEL } from './defaults';
import { EngineUsageError, usageMessages } from './errors';
import type { PreparedMeasure, PreparedObservation, PreparedSet } from './observations';

/** Why an observation was set aside: the condition it failed and the observation that contradicts it. */
export interface SkipCause {
  condition: CompiledCondition;
  contradictedBy: PreparedSet;
}

export interface Scored {
  /** unnormalised log posterior per taxon */
  logPosterior: Float64Array;
  /** normalised posterior per taxon (0 where negligible; see exactProbability); empty when not asked for */
  probability: Float64Array;
  maxLog: number;
  logTotal: number;
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

/** Log likelihood and conflict flag of a set observation for every pattern of its trait. */
export function setTables(compiled: CompiledMatrix, observation: PreparedSet): { logs: Float64Array; conflict: Uint8Array; likelihood: Float64Array } {
  const trait = observation.trait;
  const k = trait.answerCount;
  const logs = new Float64Array(trait.patternCount);
  const likelihood = new Float64Array(trait.patternCount);
  const conflict = new Uint8Array(trait.patternCount);
  for (let p = 0; p < trait.patternCount; p++) {
    const base = trait.likBase + p * k;
    let sum = 0;
    let conflicting = 1;
    for (const answer of observation.answers) {
      sum += compiled.likelihood[base + answer];
      const status = compiled.valueStatus[base + answer];
      if (status !== ValueStatus.NotCoded && status !== ValueStatus.Inapplicable) conflicting = 0;
    }
    const value = Math.min(1, sum);
    likelihood[p] = value;
    logs[p] = observation.answers.length === 1 ? compiled.logLikelihood[base + observation.answers[0]] : Math.log(value);
    conflict[p] = conflicting;
  }
  return { logs, conflict, likelihood };
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

function addMeasure(compiled: CompiledMatrix, observation: PreparedMeasure, logPosterior: Float64Array, conflicts: Uint8Array | Uint16Array, weights: Float64Array | undefined): void {
  const n = compiled.taxonCount;
  const e = observation.trait.errorRate;
  // indexed by region: 0 typical, 1 extreme, 2 outside
  const regionLogs = new Float64Array([Math.log(MODEL.typicalScore), Math.log(MODEL.extremeScore), Math.log(e)]);
  const regionScores = new Float64Array([MODEL.typicalScore, MODEL.extremeScore, e]);
  const logUnknown = Math.log(MODEL.unknownNumericScore);
  const logOutside = regionLogs[2];
  // with no linear weights to keep, multiply a scratch array instead of branching in the loop
  const linear = weights ?? new Float64Array(n);
  const columnBase = observation.trait.index * n;
  const block = observation.trait.numericIndex * 4 * n;
  const minBase = block + RangeField.Min * n;
  const lowBase = block + RangeField.Low * n;
  const highBase = block + RangeField.High * n;
  const maxBase = block + RangeField.Max * n;
  const x = observation.centimetres;
  const patterns = compiled.cellPattern;
  const ranges = compiled.ranges;
  for (let t = 0; t < n; t++) {
    const pattern = patterns[columnBase + t];
    if (pattern === CODED_RANGE_PATTERN) {
      // branch-free on purpose: where a measurement falls is unpredictable from taxon to taxon
      const typical = +(x >= ranges[lowBase + t]) & +(x <= ranges[highBase + t]);
      const extreme = +(x >= ranges[minBase + t]) & +(x <= ranges[maxBase + t]);
      const region = 2 - extreme - typical;
      logPosterior[t] += regionLogs[region];
      linear[t] *= regionScores[region];
      conflicts[t] += region >>> 1;
    } else if (pattern === UNKNOWN_PATTERN) {
      logPosterior[t] += logUnknown;
      linear[t] *= MODEL.unknownNumericScore;
    } else {
      logPosterior[t] += logOutside;
      linear[t] *= e;
      conflicts[t]++;
    }
  }
}

/** observations added per pass over the taxa */
const GROUP = 5;

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

/**
 * Adds every set observation in as few passes over the taxa as possible, five columns at a time
 * (a short last group is padded with a column of unknown cells that adds nothing): each taxon's
 * running sum is read and written once per group instead of once per observation.
 */
function addSets(compiled: CompiledMatrix, observations: readonly PreparedSet[], logPosterior: Float64Array, conflicts: Uint8Array | Uint16Array, weights: Float64Array | undefined): void {
  const n = compiled.taxonCount;
  if (observations.length === 0) return;
  const columns = observations.map((observation) => compiled.cellPattern.subarray(observation.trait.index * n, (observation.trait.index + 1) * n));
  const tables = observations.map((observation) => setTables(compiled, observation));
  const padding = (GROUP - (observations.length % GROUP)) % GROUP;
  if (padding > 0) {
    const unknownColumn = unknownColumnOf(compiled);
    const nothing = { logs: new Float64Array(1), conflict: new Uint8Array(1), likelihood: new Float64Array([1]) };
    for (let i = 0; i < padding; i++) {
      columns.push(unknownColumn);
      tables.push(nothing);
    }
  }
  const linear = weights ?? new Float64Array(n);
  for (let o = 0; o < columns.length; o += GROUP) {
    const c0 = columns[o];
    const c1 = columns[o + 1];
    const c2 = columns[o + 2];
    const c3 = columns[o + 3];
    const c4 = columns[o + 4];
    const l0 = tables[o].logs;
    const l1 = tables[o + 1].logs;
    const l2 = tables[o + 2].logs;
    const l3 = tables[o + 3].logs;
    const l4 = tables[o + 4].logs;
    const m0 = tables[o].likelihood;
    const m1 = tables[o + 1].likelihood;
    const m2 = tables[o + 2].likelihood;
    const m3 = tables[o + 3].likelihood;
    const m4 = tables[o + 4].likelihood;
    const f0 = tables[o].conflict;
    const f1 = tables[o + 1].conflict;
    const f2 = tables[o + 2].conflict;
    const f3 = tables[o + 3].conflict;
    const f4 = tables[o + 4].conflict;
    for (let t = 0; t < n; t++) {
      const p0 = c0[t];
      const p1 = c1[t];
      const p2 = c2[t];
      const p3 = c3[t];
      const p4 = c4[t];
      logPosterior[t] += l0[p0] + l1[p1] + l2[p2] + l3[p3] + l4[p4];
      linear[t] *= m0[p0] * m1[p1] * m2[p2] * m3[p3] * m4[p4];
      conflicts[t] += f0[p0] + f1[p1] + f2[p2] + f3[p3] + f4[p4];
    }
  }
}

/** Log weights more than this far below the best contribute less than 2e-16 of it each and are not exponentiated. */
const NEGLIGIBLE_LOG_GAP = 36;

/** The largest log weight and the log of Σ exp(weight − largest): all a ranking needs to normalise. */
export function logNormaliser(logWeights: Float64Array, visit?: (t: number) => void): { maxLog: number; logTotal: number } {
  const n = logWeights.length;
  if (n === 0) return { maxLog: 0, logTotal: 0 };
  let max = -Infinity;
  for (let t = 0; t < n; t++) if (logWeights[t] > max) max = logWeights[t];
  if (!Number.isFinite(max)) {
    if (visit) for (let t = 0; t < n; t++) visit(t);
    return { maxLog: 0, logTotal: Math.log(n) };
  }
  const floor = max - NEGLIGIBLE_LOG_GAP;
  let total = 0;
  // the visitor rides along this pass so a ranking reads each taxon's score once more, not twice
  if (visit) {
    for (let t = 0; t < n; t++) {
      const log = logWeights[t];
      if (log >= floor) total += Math.exp(log - max);
      visit(t);
    }
  } else {
    for (let t = 0; t < n; t++) {
      const log = logWeights[t];
      if (log >= floor) total += Math.exp(log - max);
    }
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
  // the log sum and the plain product of the same factors can differ in the last bit
  return Math.min(1, Math.exp(scored.logPosterior[t] - scored.maxLog - scored.logTotal));
}

/** Scores prepared observations against every taxon. */
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
  let lowest = 0;
  for (const log of logPrior) if (log < lowest) lowest = log;
  for (const observation of active) {
    if (observation.kind === 'measure') {
      lowest += Math.log(Math.min(MODEL.extremeScore, MODEL.unknownNumericScore, observation.trait.errorRate));
      continue;
    }
    lowest += smallestLogLikelihoods(compiled)[observation.trait.index];
  }
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
  logPosterior: Float64Array;
  linear: Float64Array;
  conflicts8: Uint8Array;
  conflicts16: Uint16Array | undefined;
}

const scratches = new WeakMap<CompiledMatrix, ScoringScratch>();

export function scoringScratch(compiled: CompiledMatrix): ScoringScratch {
  let scratch = scratches.get(compiled);
  if (!scratch) {
    const n = compiled.taxonCount;
    scratch = { logPosterior: new Float64Array(n), linear: new Float64Array(n), conflicts8: new Uint8Array(n), conflicts16: undefined };
    scratches.set(compiled, scratch);
  }
  return scratch;
}

/**
 * Scores prepared observations against every taxon; `visit` is called for each taxon once its score
 * is final. With a `scratch`, the returned arrays are the scratch's and only valid until the next
 * scoring with it (see ScoringScratch); without, they are fresh.
 */
export function scoreObservations(
  compiled: CompiledMatrix,
  prepared: readonly PreparedObservation[],
  priors?: Readonly<Record<string, number>>,
  withProbabilities = true,
  visit?: (t: number, scored: Scored) => void,
  scratch?: ScoringScratch,
): Scored {
  const n = compiled.taxonCount;
  const logPrior = logPriors(compiled, priors);
  let logPosterior: Float64Array;
  let conflicts: Uint8Array | Uint16Array;
  // one byte per taxon is enough below 256 observations, and halves the traffic of counting
  const narrow = prepared.length < 256;
  if (scratch) {
    logPosterior = scratch.logPosterior;
    logPosterior.set(logPrior);
    if (narrow) conflicts = scratch.conflicts8.fill(0);
    else conflicts = (scratch.conflicts16 ??= new Uint16Array(n)).fill(0);
  } else {
    logPosterior = logPrior.slice();
    conflicts = narrow ? new Uint8Array(n) : new Uint16Array(n);
  }
  const skipped = findSkipped(prepared);
  const active = prepared.filter((observation) => !skipped.has(observation.index));
  let linear: Float64Array | undefined;
  if (lowestPossibleLog(compiled, active, logPrior) > LINEAR_SAFE_LOG) {
    const weights = priorWeights(compiled, priors, logPrior);
    if (scratch) {
      linear = scratch.linear;
      linear.set(weights);
    } else {
      linear = weights.slice();
    }
  }
  // with no linear weights to keep, the set and measure passes multiply a throwaway array of zeros
  const throwaway = linear ?? (scratch ? scratch.linear.fill(0) : undefined);
  addSets(compiled, active.filter((observation): observation is PreparedSet => observation.kind === 'set'), logPosterior, conflicts, throwaway);
  for (const observation of active) if (observation.kind === 'measure') addMeasure(compiled, observation, logPosterior, conflicts, throwaway);
  const scored: Scored = { logPosterior, probability: new Float64Array(0), maxLog: 0, logTotal: 0, conflicts, active, skipped };
  if (linear && n > 0) {
    let total = 0;
    if (visit) {
      for (let t = 0; t < n; t++) {
        total += linear[t];
        visit(t, scored);
      }
    } else {
      for (let t = 0; t < n; t++) total += linear[t];
    }
    scored.logTotal = Math.log(total);
    if (withProbabilities) {
      const scale = 1 / total;
      for (let t = 0; t < n; t++) linear[t] *= scale;
      scored.probability = linear;
    }
    return scored;
  }
  const normaliser = logNormaliser(logPosterior, visit && ((t) => visit(t, scored)));
  scored.maxLog = normaliser.maxLog;
  scored.logTotal = normaliser.logTotal;
  if (withProbabilities) scored.probability = normalise(logPosterior, normaliser);
  return scored;
}
