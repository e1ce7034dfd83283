/**
 * suggest: which trait to Look at next.
 *
 * Each unobserved trait is scored by the expected reduction of the entropy of the current posterior
 * (Shannon 1948) per unit of ease. For a small shortlist the order is refined by one step of
 * lookahead: the expected effort of asking the trait and then following the greedy choice.
 * Invariant: a suggestion is never a trait already observed, excluded, out of season, ruled out by an
 * observed appliesWhen condition, or one expected to gain less than SUGGEST_DEFAULTS.minGainBits.
 */
import { bandLabel, bandProbabilities, weightedCuts } from './bands';
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, ValueStatus, type CompiledMatrix, type CompiledTrait } from './compiled';
import { MODEL, SUGGEST_DEFAULTS, type SuggestOptions } from './defaults';
import { prepareObservations, type PreparedObservation } from './observations';
import { resolveCount } from './rank';
import { scoreObservations, type Scored } from './scoring';
import { answerLabelAt } from './words';
import { visibleInSeason } from './vocabulary';
import type { Observation, ObservingSeason, Suggestion, SuggestionPreview } from './types';

const LN2 = Math.LN2;
/** shortlists up to this size get numeric bands cut at their own midpoints; larger ones use the edition's */
const ADAPTIVE_BAND_LIMIT = 300;
/** first traits compared by lookahead */
const LOOKAHEAD_TRAITS = 4;
/** traits the greedy continuation chooses from inside a lookahead */
const LOOKAHEAD_POOL = 6;
/** most nodes one lookahead rollout expands before estimating the rest */
const ROLLOUT_NODE_BUDGET = 1500;
/** branches reached with less probability than this are estimated instead of expanded */
const ROLLOUT_MIN_PATH = 0.05;
/** expected efforts closer than this are treated as equal */
const COST_TIE = 2e-3;
/** deepest question a rollout expands */
const ROLLOUT_MAX_DEPTH = 8;

/** The taxa that carry real probability, with their renormalised weights. */
interface WorkingSet {
  members: Int32Array;
  weight: Float64Array;
  /** weight · ln(weight) */
  weightLog: Float64Array;
  /** entropy of `weight` in nats */
  entropyNats: number;
}

function workingSet(scored: Scored, threshold: number): WorkingSet {
  const n = scored.probability.length;
  let count = 0;
  let total = 0;
  for (let t = 0; t < n; t++) {
    if (scored.probability[t] >= threshold) {
      count++;
      total += scored.probability[t];
    }
  }
  const members = new Int32Array(count);
  const weight = new Float64Array(count);
  const weightLog = new Float64Array(count);
  let i = 0;
  let entropyNats = 0;
  for (let t = 0; t < n; t++) {
    const p = scored.probability[t];
    if (p < threshold) continue;
    members[i] = t;
    const w = p / total;
    weight[i] = w;
    weightLog[i] = w > 0 ? w * Math.log(w) : 0;
    entropyNats -= weightLog[i];
    i++;
  }
  return { members, weight, weightLog, entropyNats: Math.max(0, entropyNats) };
}

/** True when an active observation contradicts the trait's appliesWhen condition. */
function conditionContradicted(trait: CompiledTrait, active: readonly PreparedObservation[]): boolean {
  return trait.conditions.some((condition) => {
    const observed = active.find((observation) => observation.trait.index === condition.trait);
    return observed !== undefined && observed.kind === 'set' && !observed.answers.some((answer) => condition.allowed.includes(answer));
  });
}

/** Per answer: P(answer), and the answer-weighted sums needed for the posterior entropy. */
interface AnswerSums {
  /** S1[a] = Σ w·L */
  mass: Float64Array;
  /** Σ w·ln w·L + Σ w·L·ln L */
  logMass: Float64Array;
}

/** Expected entropy reduction (bits) from answer sums; unanswerable mass keeps the entropy. */
function gainFromSums(sums: AnswerSums, entropyNats: number): number {
  let after = 0;
  let answered = 0;
  for (let a = 0; a < sums.mass.length; a++) {
    const mass = sums.mass[a];
    if (mass <= 0) continue;
    answered += mass;
    after += -sums.logMass[a] + mass * Math.log(mass);
  }
  after += Math.max(0, 1 - answered) * entropyNats;
  return Math.max(0, (entropyNats - after) / LN2);
}

function discreteSums(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet): AnswerSums {
  const n = compiled.taxonCount;
  const k = trait.answerCount;
  const patternWeight = new Float64Array(trait.patternCount);
  const patternWeightLog = new Float64Array(trait.patternCount);
  const patterns = compiled.cellPattern;
  const base = trait.index * n;
  const { members, weight, weightLog } = set;
  if (members.length === n) {
    // every taxon is in the set: members[i] = i, so read the column straight through
    const column = patterns.subarray(base, base + n);
    for (let t = 0; t < n; t++) {
      const pattern = column[t];
      patternWeight[pattern] += weight[t];
      patternWeightLog[pattern] += weightLog[t];
    }
  } else {
    for (let i = 0; i < members.length; i++) {
      const pattern = patterns[base + members[i]];
      patternWeight[pattern] += weight[i];
      patternWeightLog[pattern] += weightLog[i];
    }
  }
  const mass = new Float64Array(k);
  const logMass = new Float64Array(k);
  for (let p = 0; p < trait.patternCount; p++) {
    const w = patternWeight[p];
    if (w <= 0) continue;
    const wl = patternWeightLog[p];
    const row = trait.likBase + p * k;
    for (let a = 0; a < k; a++) {
      const likelihood = compiled.likelihood[row + a];
      mass[a] += w * likelihood;
      logMass[a] += wl * likelihood + w * likelihood * compiled.logLikelihood[row + a];
    }
  }
  return { mass, logMass };
}

/** Band likelihoods of one numeric trait for every taxon, for the edition's own cuts; band-major (b · n + t). */
interface BandTable {
  cuts: number[];
  likelihood: Float32Array;
  likelihoodLog: Float32Array;
}

const bandTables = new WeakMap<CompiledMatrix, Map<number, BandTable>>();

function bandRow(compiled: CompiledMatrix, trait: CompiledTrait, t: number, cuts: readonly number[], out: Float64Array): Float64Array {
  const n = compiled.taxonCount;
  const pattern = compiled.cellPattern[trait.index * n + t];
  const bands = cuts.length + 1;
  if (pattern === UNKNOWN_PATTERN) return out.fill(1 / bands);
  if (pattern === INAPPLICABLE_PATTERN) return out.fill(trait.errorRate / bands);
  const block = trait.numericIndex * 4 * n;
  const r = compiled.ranges;
  return bandProbabilities(r[block + RangeField.Min * n + t], r[block + RangeField.Low * n + t], r[block + RangeField.High * n + t], r[block + RangeField.Max * n + t], cuts, MODEL.typicalShare, trait.errorRate, out);
}

function editionBandTable(compiled: CompiledMatrix, trait: CompiledTrait): BandTable {
  let perTrait = bandTables.get(compiled);
  if (!perTrait) {
    perTrait = new Map();
    bandTables.set(compiled, perTrait);
  }
  const cached = perTrait.get(trait.index);
  if (cached) return cached;
  const n = compiled.taxonCount;
  const cuts = trait.bandCuts;
  const bands = cuts.length + 1;
  const likelihood = new Float32Array(n * bands);
  const likelihoodLog = new Float32Array(n * bands);
  const row = new Float64Array(bands);
  for (let t = 0; t < n; t++) {
    bandRow(compiled, trait, t, cuts, row);
    for (let b = 0; b < bands; b++) {
      likelihood[b * n + t] = row[b];
      likelihoodLog[b * n + t] = row[b] > 0 ? row[b] * Math.log(row[b]) : 0;
    }
  }
  const table = { cuts, likelihood, likelihoodLog };
  perTrait.set(trait.index, table);
  return table;
}

/** Cuts for a numeric trait over the working set: its own midpoints when small, the edition's otherwise. */
function cutsFor(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet): number[] {
  if (set.members.length > ADAPTIVE_BAND_LIMIT) return trait.bandCuts;
  const n = compiled.taxonCount;
  const block = trait.numericIndex * 4 * n;
  const midpoints: number[] = [];
  const weights: number[] = [];
  for (let i = 0; i < set.members.length; i++) {
    const t = set.members[i];
    if (compiled.cellPattern[trait.index * n + t] < 2) continue;
    midpoints.push((compiled.ranges[block + RangeField.Low * n + t] + compiled.ranges[block + RangeField.High * n + t]) / 2);
    weights.push(set.weight[i]);
  }
  return weightedCuts(midpoints, weights, MODEL.numericBands);
}

function numericSums(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet, cuts: readonly number[]): AnswerSums {
  const bands = cuts.length + 1;
  const mass = new Float64Array(bands);
  const logMass = new Float64Array(bands);
  const { members, weight, weightLog } = set;
  if (cuts === trait.bandCuts) {
    const table = editionBandTable(compiled, trait);
    const n = compiled.taxonCount;
    const full = members.length === n;
    for (let b = 0; b < bands; b++) {
      const likelihood = table.likelihood.subarray(b * n, (b + 1) * n);
      const likelihoodLog = table.likelihoodLog.subarray(b * n, (b + 1) * n);
      let bandMass = 0;
      let bandLogMass = 0;
      if (full) {
        for (let t = 0; t < n; t++) {
          const value = likelihood[t];
          const w = weight[t];
          bandMass += w * value;
          bandLogMass += weightLog[t] * value + w * likelihoodLog[t];
        }
      } else {
        for (let i = 0; i < members.length; i++) {
          const t = members[i];
          const value = likelihood[t];
          bandMass += weight[i] * value;
          bandLogMass += weightLog[i] * value + weight[i] * likelihoodLog[t];
        }
      }
      mass[b] = bandMass;
      logMass[b] = bandLogMass;
    }
    return { mass, logMass };
  }
  const row = new Float64Array(bands);
  for (let i = 0; i < members.length; i++) {
    bandRow(compiled, trait, members[i], cuts, row);
    for (let b = 0; b < bands; b++) {
      const likelihood = row[b];
      mass[b] += weight[i] * likelihood;
      logMass[b] += weightLog[i] * likelihood + (likelihood > 0 ? weight[i] * likelihood * Math.log(likelihood) : 0);
    }
  }
  return { mass, logMass };
}

/** One trait's candidate answers over the working set. */
interface Evaluated {
  trait: CompiledTrait;
  gain: number;
  score: number;
  sums: AnswerSums;
  /** numeric traits: the cuts the bands were made with */
  cuts?: number[];
}

/** Likelihood of each answer for each working-set member: rows[a][i]. */
function answerRows(compiled: CompiledMatrix, evaluated: Evaluated, set: WorkingSet): Float64Array[] {
  const trait = evaluated.trait;
  const n = compiled.taxonCount;
  const m = set.members.length;
  if (trait.kind === 'numeric') {
    const cuts = evaluated.cuts ?? [];
    const bands = cuts.length + 1;
    const rows = Array.from({ length: bands }, () => new Float64Array(m));
    const row = new Float64Array(bands);
    for (let i = 0; i < m; i++) {
      bandRow(compiled, trait, set.members[i], cuts, row);
      for (let b = 0; b < bands; b++) rows[b][i] = row[b];
    }
    return rows;
  }
  const k = trait.answerCount;
  const rows = Array.from({ length: k }, () => new Float64Array(m));
  for (let i = 0; i < m; i++) {
    const pattern = compiled.cellPattern[trait.index * n + set.members[i]];
    for (let a = 0; a < k; a++) rows[a][i] = compiled.likelihood[trait.likBase + pattern * k + a];
  }
  return rows;
}

/** Whether answer `a` conflicts with taxon t's coding (for counting what stays within leeway). */
function answerConflicts(compiled: CompiledMatrix, evaluated: Evaluated, t: number, a: number): boolean {
  const trait = evaluated.trait;
  const n = compiled.taxonCount;
  const pattern = compiled.cellPattern[trait.index * n + t];
  if (pattern === UNKNOWN_PATTERN) return false;
  if (pattern === INAPPLICABLE_PATTERN) return true;
  if (trait.kind !== 'numeric') {
    const status = compiled.valueStatus[trait.likBase + pattern * trait.answerCount + a];
    return status === ValueStatus.NotCoded || status === ValueStatus.Inapplicable;
  }
  const cuts = evaluated.cuts ?? [];
  const from = a === 0 ? -Infinity : cuts[a - 1];
  const to = a === cuts.length ? Infinity : cuts[a];
  const block = trait.numericIndex * 4 * n;
  const min = compiled.ranges[block + RangeField.Min * n + t];
  const max = compiled.ranges[block + RangeField.Max * n + t];
  return max < from || min >= to;
}

/** Working-set positions, heaviest first (equal weights: lower position first). */
function heaviestFirst(set: WorkingSet): Int32Array {
  const order = Int32Array.from({ length: set.members.length }, (_, i) => i);
  return order.sort((a, b) => set.weight[b] - set.weight[a] || a - b);
}

/**
 * Working-set positions of the three members with the largest positive weight × likelihood, best
 * first (equal values: lower position first). Members are visited heaviest first and the scan
 * stops at the first whose weight alone is below the third value: a likelihood is at most 1, so
 * no lighter member can reach it.
 */
function leadersBy(set: WorkingSet, order: Int32Array, likelihoodOf: (i: number) => number): number[] {
  const best = new Int32Array(3).fill(-1);
  const values = new Float64Array(3);
  for (const i of order) {
    if (best[2] >= 0 && set.weight[i] < values[2]) break;
    const value = set.weight[i] * likelihoodOf(i);
    if (value > 0) insertTop(best, 0, values, i, value, 3);
  }
  return Array.from(best).filter((i) => i >= 0);
}

/** Who stays within the leeway whatever the answer, and who is one conflict from leaving. */
interface LeewayCounts {
  below: number;
  atLeeway: number[];
}

function leewayCounts(scored: Scored, leeway: number): LeewayCounts {
  let below = 0;
  const atLeeway: number[] = [];
  const conflicts = scored.conflicts;
  for (let t = 0; t < conflicts.length; t++) {
    if (conflicts[t] < leeway) below++;
    else if (conflicts[t] === leeway) atLeeway.push(t);
  }
  return { below, atLeeway };
}

/** Inserts member i with `value` into `best` (positions, best first, -1 = empty) when it is among the top; ties go to the lower position. */
function insertTop(best: Int32Array, at: number, values: Float64Array, i: number, value: number, size: number): void {
  let slot = size;
  while (slot > 0 && (best[at + slot - 1] < 0 || value > values[at + slot - 1] || (value === values[at + slot - 1] && i < best[at + slot - 1]))) slot--;
  if (slot >= size) return;
  for (let s = size - 1; s > slot; s--) {
    best[at + s] = best[at + s - 1];
    values[at + s] = values[at + s - 1];
  }
  best[at + slot] = i;
  values[at + slot] = value;
}

/** Leaders per answer of a discrete trait (its likelihood depends only on the member's pattern). */
function discreteLeaders(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet, order: Int32Array): number[][] {
  const base = trait.index * compiled.taxonCount;
  const k = trait.answerCount;
  return Array.from({ length: k }, (_, a) => leadersBy(set, order, (i) => compiled.likelihood[trait.likBase + compiled.cellPattern[base + set.members[i]] * k + a]));
}

function previewOf(compiled: CompiledMatrix, evaluated: Evaluated, set: WorkingSet, order: Int32Array, counts: LeewayCounts): SuggestionPreview[] {
  const trait = evaluated.trait;
  const isNumeric = trait.kind === 'numeric';
  const leadersByAnswer = isNumeric ? answerRows(compiled, evaluated, set).map((row) => leadersBy(set, order, (i) => row[i])) : discreteLeaders(compiled, trait, set, order);
  return leadersByAnswer.map((leaders, a) => {
    let remaining = counts.below;
    for (const t of counts.atLeeway) if (!answerConflicts(compiled, evaluated, t, a)) remaining++;
    const label = isNumeric ? bandLabel(evaluated.cuts ?? [], a) : answerLabelAt(trait, a);
    return {
      answer: isNumeric ? label : trait.answerCodes[a],
      label,
      probability: evaluated.sums.mass[a],
      leaders: leaders.map((i) => compiled.taxa[set.members[i]].id),
      remaining,
    };
  });
}

/* ------------------------------------------------------------------------------------------------
 * Lookahead on a small shortlist: dense per-answer likelihood rows and a greedy rollout.
 * ---------------------------------------------------------------------------------------------- */

interface DenseTrait {
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
  return { ease: evaluated.trait.ease, answers: answerRowsOf.length, rows, rowLogs };
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

function lookahead(compiled: CompiledMatrix, ranked: Evaluated[], set: WorkingSet, confidentAt: number): Map<Evaluated, number> {
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

/** Whether the trait's answers can fall differently for two members of the shortlist. */
function splitsShortlist(compiled: CompiledMatrix, trait: CompiledTrait, shortlist: WorkingSet): boolean {
  const n = compiled.taxonCount;
  const base = trait.index * n;
  const members = shortlist.members;
  if (members.length < 2) return false;
  if (trait.kind === 'numeric') {
    const block = trait.numericIndex * 4 * n;
    const first = members[0];
    for (let i = 1; i < members.length; i++) {
      const t = members[i];
      if (compiled.cellPattern[base + t] !== compiled.cellPattern[base + first]) return true;
      for (let field = 0; field < 4; field++) if (compiled.ranges[block + field * n + t] !== compiled.ranges[block + field * n + first]) return true;
    }
    return false;
  }
  const k = trait.answerCount;
  const firstRow = trait.likBase + compiled.cellPattern[base + members[0]] * k;
  for (let i = 1; i < members.length; i++) {
    const row = trait.likBase + compiled.cellPattern[base + members[i]] * k;
    if (row === firstRow) continue;
    for (let a = 0; a < k; a++) if (Math.abs(compiled.likelihood[row + a] - compiled.likelihood[firstRow + a]) > 1e-12) return true;
  }
  return false;
}

function resolveSeason(season: unknown): ObservingSeason {
  return season === 'leaf-off' ? 'leaf-off' : 'leaf-on';
}

/**
 * The unobserved traits most worth looking at next, best first. Throws ObservationError for invalid
 * observations.
 */
export function suggest(compiled: CompiledMatrix, observations: readonly Observation[], options: SuggestOptions = {}): Suggestion[] {
  const season = resolveSeason(options.season ?? SUGGEST_DEFAULTS.season);
  const limit = resolveCount('limit', options.limit, SUGGEST_DEFAULTS.limit);
  const leeway = resolveCount('leeway', options.leeway, SUGGEST_DEFAULTS.leeway);
  const lookaheadMax = resolveCount('lookaheadMaxCandidates', options.lookaheadMaxCandidates, SUGGEST_DEFAULTS.lookaheadMaxCandidates);
  const confidentAt = options.confidentAt ?? SUGGEST_DEFAULTS.confidentAt;
  const prepared = prepareObservations(compiled, observations);
  const scored = scoreObservations(compiled, prepared, options.priors);
  const set = workingSet(scored, SUGGEST_DEFAULTS.negligibleProbability);
  if (set.members.length < 2 || limit === 0) return [];
  let leader = 0;
  for (const p of scored.probability) if (p > leader) leader = p;
  const shortlist = workingSet(scored, leader * SUGGEST_DEFAULTS.shortlistShare);

  const observed = new Set(prepared.map((observation) => observation.trait.index));
  const excluded = new Set(options.exclude ?? []);
  const evaluated: Evaluated[] = [];
  for (const trait of compiled.traits) {
    if (observed.has(trait.index) || excluded.has(trait.code) || !visibleInSeason(trait, season)) continue;
    if (conditionContradicted(trait, scored.active) || !splitsShortlist(compiled, trait, shortlist)) continue;
    let sums: AnswerSums;
    let cuts: number[] | undefined;
    if (trait.kind === 'numeric') {
      cuts = cutsFor(compiled, trait, set);
      if (cuts.length === 0) continue;
      sums = numericSums(compiled, trait, set, cuts);
    } else {
      if (trait.answerCount < 2) continue;
      sums = discreteSums(compiled, trait, set);
    }
    const gain = gainFromSums(sums, set.entropyNats);
    if (gain < SUGGEST_DEFAULTS.minGainBits) continue;
    evaluated.push({ trait, gain, score: gain / trait.ease, sums, ...(cuts && { cuts }) });
  }
  evaluated.sort((a, b) => b.score - a.score || a.trait.index - b.trait.index);

  let costs: Map<Evaluated, number> | undefined;
  if (lookaheadMax > 0 && shortlist.members.length <= lookaheadMax && evaluated.length > 1) {
    costs = lookahead(compiled, evaluated, shortlist, confidentAt);
    const withCost = evaluated.filter((item) => costs?.has(item));
    // costs within COST_TIE of each other are ties (the error floor adds noise of that order); the better gain per ease wins
    withCost.sort((a, b) => {
      const difference = (costs?.get(a) ?? 0) - (costs?.get(b) ?? 0);
      return Math.abs(difference) > COST_TIE ? difference : b.score - a.score || a.trait.index - b.trait.index;
    });
    evaluated.splice(0, withCost.length, ...withCost);
  }

  const counts = leewayCounts(scored, leeway);
  const order = heaviestFirst(set);
  return evaluated.slice(0, limit).map((item) => {
    const effort = costs?.get(item);
    return {
      trait: item.trait.code,
      label: item.trait.label,
      expectedGain: item.gain,
      score: item.score,
      preview: previewOf(compiled, item, set, order, counts),
      ...(effort !== undefined && { expectedEffort: effort }),
    };
  });
}
