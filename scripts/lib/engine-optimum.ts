/**
 * The exact optimum of expected questions for small, error-free matrices, by dynamic programming
 * over candidate subsets (every subset of at most 20 taxa is a state).
 *
 * Invariant: only for matrices whose cells each hold one usual value and are all coded, where the
 * candidates consistent with the answers so far fully describe the state of a sift.
 */
import type { CompiledMatrix } from '@shared/engine';

function popcount(value: number): number {
  let count = 0;
  for (let rest = value; rest !== 0; rest &= rest - 1) count++;
  return count;
}

/** value index of each taxon for each trait: values[j][t] */
export function singleValues(compiled: CompiledMatrix): number[][] {
  const n = compiled.taxonCount;
  return compiled.traits.map((trait) => {
    const row: number[] = [];
    for (let t = 0; t < n; t++) {
      const pattern = compiled.cellPattern[trait.index * n + t];
      const offset = trait.maskBase + pattern * 3 * trait.words;
      let value = -1;
      for (let v = 0; v < trait.answerCount; v++) if ((compiled.masks[offset + (v >>> 5)] & (1 << (v & 31))) !== 0) value = v;
      if (pattern < 2 || value < 0) throw new Error(`${compiled.taxa[t].id} × ${trait.code}: the exact optimum needs one coded value per cell`);
      row.push(value);
    }
    return row;
  });
}

/**
 * Minimum over question strategies of the expected number of questions (uniform prior over taxa)
 * until one candidate remains or no trait splits the candidates left.
 */
export function optimalExpectedQuestions(compiled: CompiledMatrix): number {
  const n = compiled.taxonCount;
  if (n > 20) throw new Error('the exact optimum is for at most 20 taxa');
  const values = singleValues(compiled);
  const memo = new Float64Array(1 << n).fill(-1);
  const solve = (set: number): number => {
    if (memo[set] >= 0) return memo[set];
    const size = popcount(set);
    let best = Infinity;
    if (size > 1) {
      for (const row of values) {
        const groups = new Map<number, number>();
        for (let t = 0; t < n; t++) if (set & (1 << t)) groups.set(row[t], (groups.get(row[t]) ?? 0) | (1 << t));
        if (groups.size < 2) continue;
        let cost = 1;
        for (const group of groups.values()) cost += (popcount(group) / size) * solve(group);
        if (cost < best) best = cost;
      }
    }
    const result = Number.isFinite(best) ? best : 0;
    memo[set] = result;
    return result;
  };
  return solve((1 << n) - 1);
}
