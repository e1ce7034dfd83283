/**
 * Answer sums: for one unobserved trait, how the working set's probability would split over its
 * answers (state values, counts, or bands of a numeric trait), and the expected entropy reduction.
 *
 * Invariant: mass[a] is Σ over working-set members of weight · P(answer a | member); probability no
 * answer takes keeps the current entropy, so the expected gain is never negative.
 */
import { bandProbabilities, weightedCuts } from './bands';
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import { MODEL } from './defaults';
import type { Scored } from './scoring';

const LN2 = Math.LN2;
/** shortlists up to this size get numeric bands cut at their own midpoints; larger ones use the edition's */
const ADAPTIVE_BAND_LIMIT = 300;

/** The taxa that carry real probability, with their renormalised weights. */
export interface WorkingSet {
  members: Int32Array;
  weight: Float64Array;
  /** weight · ln(weight) */
  weightLog: Float64Array;
  /** entropy of `weight` in nats */
  entropyNats: number;
}

export function workingSet(scored: Scored, threshold: number): WorkingSet {
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

/** Per answer: P(answer), and the answer-weighted sums needed for the posterior entropy. */
export interface AnswerSums {
  /** S1[a] = Σ w·L */
  mass: Float64Array;
  /** Σ w·ln w·L + Σ w·L·ln L */
  logMass: Float64Array;
}

/** Expected entropy reduction (bits) from answer sums; unanswerable mass keeps the entropy. */
export function gainFromSums(sums: AnswerSums, entropyNats: number): number {
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

export function discreteSums(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet): AnswerSums {
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
  return bandProbabilities(
    r[block + RangeField.Min * n + t],
    r[block + RangeField.Low * n + t],
    r[block + RangeField.High * n + t],
    r[block + RangeField.Max * n + t],
    cuts,
    MODEL.typicalShare,
    trait.errorRate,
    out,
  );
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
export function cutsFor(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet): number[] {
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

export function numericSums(compiled: CompiledMatrix, trait: CompiledTrait, set: WorkingSet, cuts: readonly number[]): AnswerSums {
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
export interface Evaluated {
  trait: CompiledTrait;
  gain: number;
  /** gain × the chance the trait can be seen now (× how seldom it is misread, for an opening question) ÷ ease */
  score: number;
  /** ease ÷ the chance the trait can be seen now: the expected effort of looking for it */
  effort: number;
  sums: AnswerSums;
  /** numeric traits: the cuts the bands were made with */
  cuts?: number[];
}

/** Likelihood of each answer for each working-set member: rows[a][i]. */
export function answerRows(compiled: CompiledMatrix, evaluated: Evaluated, set: WorkingSet): Float64Array[] {
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
