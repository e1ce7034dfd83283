/**
 * Lookahead on a small shortlist: dense per-answer likelihood rows and a greedy rollout, giving
 * each of the first few traits the expected effort of asking it and then following the greedy choice.
 *
 * Invariant: a rollout expands at most ROLLOUT_NODE_BUDGET nodes and ROLLOUT_MAX_DEPTH questions;
 * beyond them, and below ROLLOUT_MIN_PATH, the rest is estimated, so its cost is bounded whatever
 * the matrix.
 */
import { answerRows, type Evaluated, type WorkingSet } from './answer-sums';
import type { CompiledMatrix } from './compiled-matrix';
import { SUGGEST_DEFAULTS } from './defaults';

const LN2 = Math.LN2;
/** first traits compared by lookahead */
const LOOKAHEAD_TRAITS = 4;
/** traits the greedy continuation chooses from inside a lookahead */
const LOOKAHEAD_POOL = 6;
/** most nodes one lookahead rollout expands before estimating the rest */
const ROLLOUT_NODE_BUDGET = 1500;
/** branches reached with less probability than this are estimated instead of expanded */
const ROLLOUT_MIN_PATH = 0.05;
/** deepest question a rollout expands */
const ROLLOUT_MAX_DEPTH = 8;

interface DenseTrait {
  /** the trait's ease ÷ the chance it can be seen now: what looking for it is expected to cost */
  ease: number;
  answers: number;
  /** likelihood of answer a for working-set member i at a · m + i */
  rows: Float64Array;
  /** r · ln r of each entry of `rows` (0 where r is 0) */
  rowLogs: Float64Array;
}

function denseTrait(compiled: CompiledMatrix, evaluated: Evaluated, set: WorkingSet): DenseTrait {
  const answerRowsOf = answerRows(compiled, evaluated, set);
  const m = set.members.length;
  const rows = new Float64Array(answerRowsOf.length * m);
  const rowLogs = new Float64Array(rows.length);
  answerRowsOf.forEach((row, a) => rows.set(row, a * m));
  for (let x = 0; x < rows.length; x++) rowLogs[x] = rows[x] > 0 ? rows[x] * Math.log(rows[x]) : 0;
  return { ease: evaluated.effort, answers: answerRowsOf.length, rows, rowLogs };
}

/** A memoised rollout cost and the expansions it took, so a reuse charges the node budget the same. */
interface Remembered {
  cost: number;
  nodes: number;
}

/**
 * Greedy rollouts over the dense traits of a small shortlist. A state (the answers given so far)
 * fixes the posterior, the path probability and the depth whatever order the answers came in, so
 * its cost is remembered and reused by every rollout that reaches it; a reuse is charged the nodes
 * the first computation expanded, so the node budget cuts exactly where it would without reuse.
 */
class Rollouts {
  private nodes = 0;
  /** budget cuts so far: a cost computed while one happened depends on the budget left and is not remembered */
  private cuts = 0;
  private readonly memo = new Map<number, Remembered>();
  /** mixed-radix place of each trait in a state key (0 = not asked, 1..answers = answer, answers + 1 = unanswered) */
  private readonly place: Float64Array;
  private readonly memoise: boolean;
  /** per depth: posterior weights, their w · ln w, and the shortlist positions */
  private readonly posteriors: Float64Array[] = [];
  private readonly weightLogs: Float64Array[] = [];
  private readonly shortlists: Int32Array[] = [];

  constructor(
    private readonly traits: readonly DenseTrait[],
    private readonly confidentAt: number,
    private readonly minGain: number,
    private readonly size: number,
  ) {
    this.place = new Float64Array(traits.length);
    let radix = 1;
    for (let j = 0; j < traits.length; j++) {
      this.place[j] = radix;
      radix *= traits[j].answers + 2;
    }
    this.memoise = radix <= Number.MAX_SAFE_INTEGER;
    for (let depth = 0; depth <= ROLLOUT_MAX_DEPTH + 2; depth++) {
      this.posteriors.push(new Float64Array(size));
      this.weightLogs.push(new Float64Array(size));
      this.shortlists.push(new Int32Array(size));
    }
  }

  /** Starts a new top-level rollout: a fresh node budget, the remembered costs kept. */
  restart(): void {
    this.nodes = 0;
  }

  /** Expected effort of asking trait j first from `weights` (normalised) and continuing greedily. */
  firstCost(weights: Float64Array, j: number): number {
    return this.costAfter(weights, 0, 0, j, 1, 0);
  }

  /** Entropy (nats) and Σ w · ln w into weightLogs[depth]; weights are normalised. */
  private entropyAt(weights: Float64Array, depth: number): number {
    const weightLog = this.weightLogs[depth];
    let nats = 0;
    for (let i = 0; i < this.size; i++) {
      const w = weights[i];
      weightLog[i] = w > 0 ? w * Math.log(w) : 0;
      nats -= weightLog[i];
    }
    return nats > 0 ? nats : 0;
  }

  /** Expected entropy reduction (nats) of trait j at these weights; weightLog holds w · ln w. */
  private gain(trait: DenseTrait, weights: Float64Array, weightLog: Float64Array, before: number): number {
    const m = this.size;
    let answered = 0;
    let after = 0;
    for (let a = 0, offset = 0; a < trait.answers; a++, offset += m) {
      let mass = 0;
      let massLog = 0;
      for (let i = 0; i < m; i++) {
        const r = trait.rows[offset + i];
        mass += weights[i] * r;
        massLog += r * weightLog[i] + weights[i] * trait.rowLogs[offset + i];
      }
      if (mass <= 0) continue;
      answered += mass;
      // mass · H(posterior) = mass · ln mass − Σ q ln q, q = w · r
      const spread = mass * Math.log(mass) - massLog;
      if (spread > 0) after += spread;
    }
    if (answered < 1) after += (1 - answered) * before;
    return before - after;
  }

  /** Whether some answer is more likely for one shortlisted member than for another (the trait can split them). */
  private splits(trait: DenseTrait, shortlist: Int32Array, count: number): boolean {
    const m = this.size;
    for (let a = 0, offset = 0; a < trait.answers; a++, offset += m) {
      const first = trait.rows[offset + shortlist[0]];
      for (let s = 1; s < count; s++) if (Math.abs(trait.rows[offset + shortlist[s]] - first) > 1e-12) return true;
    }
    return false;
  }

  /**
   * Expected effort from `weights` (normalised) when the greedy choice is followed. Unlikely or deep
   * branches are estimated as the bits left divided by the best bits-per-effort on offer there.
   */
  private cost(weights: Float64Array, asked: number, key: number, pathProbability: number, depth: number): number {
    let max = 0;
    for (let i = 0; i < this.size; i++) if (weights[i] > max) max = weights[i];
    if (max >= this.confidentAt) return 0;
    const remembered = this.memoise ? this.memo.get(key) : undefined;
    if (remembered && this.nodes + remembered.nodes <= ROLLOUT_NODE_BUDGET) {
      this.nodes += remembered.nodes;
      return remembered.cost;
    }
    const nodesBefore = this.nodes;
    const cutsBefore = this.cuts;
    const cost = this.expand(weights, max, asked, key, pathProbability, depth);
    if (this.memoise && this.cuts === cutsBefore) this.memo.set(key, { cost, nodes: this.nodes - nodesBefore });
    return cost;
  }

  private expand(weights: Float64Array, max: number, asked: number, key: number, pathProbability: number, depth: number): number {
    // the greedy choice at these weights: the trait with the best gain per ease
    const before = this.entropyAt(weights, depth);
    const weightLog = this.weightLogs[depth];
    const shortlist = this.shortlists[depth];
    let count = 0;
    for (let i = 0; i < this.size; i++) if (weights[i] >= max * SUGGEST_DEFAULTS.shortlistShare) shortlist[count++] = i;
    let best = -1;
    let rate = 0;
    for (let j = 0; j < this.traits.length; j++) {
      if (asked & (1 << j) || !this.splits(this.traits[j], shortlist, count)) continue;
      const gain = this.gain(this.traits[j], weights, weightLog, before) / LN2;
      if (gain < this.minGain) continue;
      const score = gain / this.traits[j].ease;
      if (score > rate) {
        rate = score;
        best = j;
      }
    }
    if (best < 0) return 0;
    const budgetLeft = this.nodes < ROLLOUT_NODE_BUDGET;
    if (depth >= ROLLOUT_MAX_DEPTH || pathProbability < ROLLOUT_MIN_PATH || !budgetLeft) {
      if (!budgetLeft && depth < ROLLOUT_MAX_DEPTH && pathProbability >= ROLLOUT_MIN_PATH) this.cuts++;
      // asking every trait left is the most a continuation can cost
      let easeLeft = 0;
      for (let k = 0; k < this.traits.length; k++) if (!(asked & (1 << k))) easeLeft += this.traits[k].ease;
      return Math.min(before / LN2 / rate, easeLeft);
    }
    this.nodes++;
    return this.costAfter(weights, asked, key, best, pathProbability, depth);
  }

  /** Effort of asking trait j now and continuing greedily. */
  private costAfter(weights: Float64Array, asked: number, key: number, j: number, pathProbability: number, depth: number): number {
    const trait = this.traits[j];
    const m = this.size;
    const next = asked | (1 << j);
    const posterior = this.posteriors[depth + 1];
    let total = trait.ease;
    let answered = 0;
    for (let a = 0, offset = 0; a < trait.answers; a++, offset += m) {
      let mass = 0;
      for (let i = 0; i < m; i++) {
        posterior[i] = weights[i] * trait.rows[offset + i];
        mass += posterior[i];
      }
      if (mass <= 0) continue;
      answered += mass;
      for (let i = 0; i < m; i++) posterior[i] /= mass;
      total += mass * this.cost(posterior, next, key + (a + 1) * this.place[j], pathProbability * mass, depth + 1);
    }
    const unanswered = Math.max(0, 1 - answered);
    if (unanswered > 1e-9) total += unanswered * this.cost(weights, next, key + (trait.answers + 1) * this.place[j], pathProbability * unanswered, depth + 1);
    return total;
  }
}

export function lookahead(compiled: CompiledMatrix, ranked: Evaluated[], set: WorkingSet, confidentAt: number): Map<Evaluated, number> {
  const pool = ranked.slice(0, Math.max(LOOKAHEAD_POOL, LOOKAHEAD_TRAITS));
  const dense = pool.map((evaluated) => denseTrait(compiled, evaluated, set));
  const costs = new Map<Evaluated, number>();
  const weights = Float64Array.from(set.weight);
  const rollouts = new Rollouts(dense, confidentAt, SUGGEST_DEFAULTS.minGainBits, weights.length);
  for (let j = 0; j < Math.min(LOOKAHEAD_TRAITS, pool.length); j++) {
    rollouts.restart();
    costs.set(pool[j], rollouts.firstCost(weights, j));
  }
  return costs;
}
