/**
 * Normalising log weights into probabilities without overflow or underflow.
 *
 * Invariant: `normalise` returns finite, non-negative probabilities summing to 1 (uniform when no
 * weight is finite), whatever the log weights' scale.
 */

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
