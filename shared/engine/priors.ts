/**
 * Priors: how common each taxon is before anything is observed, as normalised logs and weights.
 *
 * Invariant: every prior weight used is finite and at least MODEL.minPrior, so every log prior is
 * finite; the default priors of a matrix are computed once and cached with it.
 */
import type { CompiledMatrix } from './compiled-matrix';
import { MODEL } from './defaults';
import { EngineUsageError, usageMessages } from './errors';

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

/** Normalised prior weights (linear), cached like the log priors. */
const defaultPriorWeights = new WeakMap<CompiledMatrix, Float64Array>();

export function priorWeights(compiled: CompiledMatrix, priors: Readonly<Record<string, number>> | undefined, logs: Float64Array): Float64Array {
  const custom = priors !== undefined && Object.keys(priors).length > 0;
  const cached = custom ? undefined : defaultPriorWeights.get(compiled);
  if (cached) return cached;
  const weights = Float64Array.from(logs, Math.exp);
  if (!custom) defaultPriorWeights.set(compiled, weights);
  return weights;
}

const smallestPriors = new WeakMap<Float64Array, number>();

/** The smallest log prior (capped at 0); remembered for the cached default priors. */
export function smallestOf(logPrior: Float64Array): number {
  const known = smallestPriors.get(logPrior);
  if (known !== undefined) return known;
  let lowest = 0;
  for (const log of logPrior) if (log < lowest) lowest = log;
  smallestPriors.set(logPrior, lowest);
  return lowest;
}
