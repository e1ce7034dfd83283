/**
 * A seeded pseudo-random generator, for synthetic matrices, simulations and drills.
 *
 * Invariant: the same seed gives the same sequence on every platform (32-bit integer arithmetic
 * only, never Math.random), each draw in [0, 1).
 */

/** mulberry32: a small, fast 32-bit PRNG with good enough statistics for test data and drills. */
export function seededRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let value = state;
    value = Math.imul(value ^ (value >>> 15), value | 1);
    value ^= value + Math.imul(value ^ (value >>> 7), value | 61);
    return ((value ^ (value >>> 14)) >>> 0) / 4294967296;
  };
}

/** A shuffled copy (Fisher–Yates) drawn with the given generator. */
export function shuffled<T>(items: readonly T[], random: () => number): T[] {
  const copy = [...items];
  for (let i = copy.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    [copy[i], copy[j]] = [copy[j], copy[i]];
  }
  return copy;
}
