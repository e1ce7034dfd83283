/**
 * Shannon entropy and expected information gain (Shannon 1948, "A Mathematical Theory of
 * Communication", Bell System Technical Journal 27, section 6).
 *
 * Invariant: results are in bits, finite and ≥ 0 for any non-negative weights (zero weights add 0,
 * by the convention 0 · log 0 = 0); weights need not sum to 1.
 */

/** Non-negative weights, as a plain or a typed array. */
export type Weights = readonly number[] | Float64Array;

/** Entropy in bits of a distribution given by non-negative weights (normalised here). */
export function entropy(weights: Weights): number {
  let total = 0;
  for (const weight of weights) total += weight > 0 ? weight : 0;
  if (!(total > 0)) return 0;
  let sum = 0;
  for (const weight of weights) {
    const p = weight / total;
    if (p > 0) sum -= p * Math.log2(p);
  }
  return Math.max(0, sum);
}

/**
 * Expected reduction of entropy (bits) of `weights` from one question, where
 * `likelihoods[a][i]` is P(answer a | candidate i). Probability mass no answer accounts for
 * (answers that cannot be given) is counted as leaving the entropy unchanged.
 */
export function expectedGain(weights: Weights, likelihoods: readonly Weights[]): number {
  let total = 0;
  for (const weight of weights) total += weight;
  if (!(total > 0)) return 0;
  const before = entropy(weights);
  let after = 0;
  let answered = 0;
  const joint = new Float64Array(weights.length);
  for (const answer of likelihoods) {
    let mass = 0;
    for (let i = 0; i < weights.length; i++) {
      joint[i] = (weights[i] / total) * answer[i];
      mass += joint[i];
    }
    if (mass <= 0) continue;
    answered += mass;
    after += mass * entropy(joint);
  }
  after += Math.max(0, 1 - answered) * before;
  return Math.max(0, before - after);
}
