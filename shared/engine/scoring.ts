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
  /** normalised posterior per taxon (0 where negligible; see exactProbability) */
  probability: Float64Array;
  maxLog: number;
  logTotal: number;
  /** observed traits conflicting with each taxon's coding */
  conflicts: Uint16Array;
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

function addMeasure(compiled: CompiledMatrix, observation: PreparedMeasure, logPosterior: Float64Array, conflicts: Uint16Array): void {
  const n = compiled.taxonCount;
  const e = observation.trait.errorRate;
  // indexed by region: 0 typical, 1 extreme, 2 outside
  const regionLogs = new Float64Array([Math.log(MODEL.typicalScore), Math.log(MODEL.extremeScore), Math.log(e)]);
  const logUnknown = Math.log(MODEL.unknownNumericScore);
  const logOutside = regionLogs[2];
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
      conflicts[t] += region >>> 1;
    } else if (pattern === UNKNOWN_PATTERN) {
      logPosterior[t] += logUnknown;
    } else {
      logPosterior[t] += logOutside;
      conflicts[t]++;
    }
  }
}

/**
 * Adds every set observation in one pass over the taxa, two columns at a time: each taxon's running
 * sum is read and written once per pair instead of once per observation.
 */
function addSets(compiled: CompiledMatrix, observations: readonly PreparedSet[], logPosterior: Float64Array, conflicts: Uint16Array): void {
  const n = compiled.taxonCount;
  const columns = observations.map((observation) => compiled.cellPattern.subarray(observation.trait.index * n, (observation.trait.index + 1) * n));
  const tables = observations.map((observation) => setTables(compiled, observation));
  let o = 0;
  for (; o + 1 < observations.length; o += 2) {
    const columnA = columns[o];
    const columnB = columns[o + 1];
    const logsA = tables[o].logs;
    const logsB = tables[o + 1].logs;
    const conflictA = tables[o].conflict;
    const conflictB = tables[o + 1].conflict;
    for (let t = 0; t < n; t++) {
      const a = columnA[t];
      const b = columnB[t];
      logPosterior[t] += logsA[a] + logsB[b];
      conflicts[t] += conflictA[a] + conflictB[b];
    }
  }
  if (o < observations.length) {
    const column = columns[o];
    const { logs, conflict } = tables[o];
    for (let t = 0; t < n; t++) {
      const pattern = column[t];
      logPosterior[t] += logs[pattern];
      conflicts[t] += conflict[pattern];
    }
  }
}

/** Log weights more than this far below the best contribute less than 1e-21 each and are not exponentiated. */
const NEGLIGIBLE_LOG_GAP = 50;

export interface Normalised {
  /** probability per taxon; exactly 0 where the log weight is negligible */
  probability: Float64Array;
  /** the largest log weight */
  maxLog: number;
  /** log of the normalising sum, relative to maxLog */
  logTotal: number;
}

/**
 * Normalises log weights into probabilities that sum to 1 (max-shifted, so nothing overflows).
 * Math.exp is the dearest step of a ranking, so negligible weights are skipped; `exactProbability`
 * recovers their tiny values when a caller shows them.
 */
export function normalise(logWeights: Float64Array): Normalised {
  const n = logWeights.length;
  const probability = new Float64Array(n);
  if (n === 0) return { probability, maxLog: 0, logTotal: 0 };
  let max = -Infinity;
  for (let t = 0; t < n; t++) if (logWeights[t] > max) max = logWeights[t];
  if (!Number.isFinite(max)) return { probability: probability.fill(1 / n), maxLog: 0, logTotal: Math.log(n) };
  const floor = max - NEGLIGIBLE_LOG_GAP;
  let total = 0;
  for (let t = 0; t < n; t++) {
    const log = logWeights[t];
    if (log < floor) continue;
    const weight = Math.exp(log - max);
    probability[t] = weight;
    total += weight;
  }
  const scale = 1 / total;
  for (let t = 0; t < n; t++) probability[t] *= scale;
  return { probability, maxLog: max, logTotal: Math.log(total) };
}

/** The probability of one taxon, exact even where `normalise` left a negligible weight at 0. */
export function exactProbability(scored: Scored, t: number): number {
  if (!Number.isFinite(scored.maxLog)) return scored.probability[t];
  return Math.exp(scored.logPosterior[t] - scored.maxLog - scored.logTotal);
}

/** Scores prepared observations against every taxon. */
export function scoreObservations(compiled: CompiledMatrix, prepared: readonly PreparedObservation[], priors?: Readonly<Record<string, number>>): Scored {
  const n = compiled.taxonCount;
  const logPosterior = logPriors(compiled, priors).slice();
  const conflicts = new Uint16Array(n);
  const skipped = findSkipped(prepared);
  const active = prepared.filter((observation) => !skipped.has(observation.index));
  addSets(compiled, active.filter((observation): observation is PreparedSet => observation.kind === 'set'), logPosterior, conflicts);
  for (const observation of active) if (observation.kind === 'measure') addMeasure(compiled, observation, logPosterior, conflicts);
  const { probability, maxLog, logTotal } = normalise(logPosterior);
  return { logPosterior, probability, maxLog, logTotal, conflicts, active, skipped };
}
