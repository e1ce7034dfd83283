/**
 * The scoring core shared by rank and suggest: per taxon, the prior times P(observation | taxon) for
 * every observation — plain products where they cannot underflow, log sums where they could — and
 * the number of observations that conflict with the taxon's coding.
 *
 * Every observation becomes a column of small codes per taxon (a set observation's is its trait's
 * pattern column; a measurement's says where it falls) with one factor per code, and the columns are
 * combined ten or five at a time, so each taxon's score is written once per group of observations.
 * This file puts them together; priors.ts, likelihood-columns.ts, kernels.ts and normalise.ts hold
 * the parts.
 *
 * Invariant: `probability` is finite, non-negative and sums to 1 over all taxa (or is empty for an
 * empty matrix); every factor is finite and > 0 (every likelihood is > 0), so no score is NaN.
 */
import type { CompiledCondition, CompiledMatrix } from './compiled-matrix';
import { ConflictCounts, paddedBytes, setConflictFlags, wordsOf } from './conflict-flags';
import { MODEL } from './defaults';
import { EngineUsageError, usageMessages } from './errors';
import { addColumns } from './kernels';
import { measureColumn, setColumn, type ScoreColumn } from './likelihood-columns';
import { logNormaliser, normalise } from './normalise';
import type { PreparedObservation, PreparedSet } from './observations';
import { logPriors, priorWeights, smallestOf } from './priors';

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

/** The probability of one taxon, exact even where `normalise` left a negligible weight at 0. */
export function exactProbability(scored: Scored, t: number): number {
  if (scored.linear) return Math.min(1, scored.score[t] * scored.scale);
  return Math.min(1, Math.exp(scored.score[t] - scored.maxLog - scored.logTotal));
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
export function scoreObservations(
  compiled: CompiledMatrix,
  prepared: readonly PreparedObservation[],
  priors?: Readonly<Record<string, number>>,
  options: ScoringOptions = {},
): Scored {
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
