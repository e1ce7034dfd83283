/**
 * Simulated observers for the engine's evaluation and property tests.
 *
 * Invariant: a simulated answer is drawn only from the compiled coding of the true taxon (with the
 * engine's own frequency weights), then replaced by a wrong value with probability `errorRate`;
 * traits that do not apply to the taxon get no answer.
 */
import {
  INAPPLICABLE_PATTERN,
  MODEL,
  RangeField,
  rank,
  seeingChance,
  suggest,
  UNKNOWN_PATTERN,
  ValueStatus,
  type CompiledMatrix,
  type Observation,
} from '@shared/engine';

export type Random = () => number;

const FREQUENCY_WEIGHT: Record<number, number> = {
  [ValueStatus.Usual]: MODEL.usualWeight,
  [ValueStatus.Occasional]: MODEL.occasionalWeight,
  [ValueStatus.Rare]: MODEL.rareWeight,
};

function spanOf(compiled: CompiledMatrix, traitIndex: number): { min: number; max: number } {
  const trait = compiled.traits[traitIndex];
  const n = compiled.taxonCount;
  const block = trait.numericIndex * 4 * n;
  let min = Infinity;
  let max = -Infinity;
  for (let t = 0; t < n; t++) {
    if (compiled.cellPattern[traitIndex * n + t] < 2) continue;
    min = Math.min(min, compiled.ranges[block + RangeField.Min * n + t]);
    max = Math.max(max, compiled.ranges[block + RangeField.Max * n + t]);
  }
  return Number.isFinite(min) ? { min, max } : { min: 0, max: 1 };
}

/** One simulated answer about taxon t, or undefined when the trait does not apply to it. */
export function drawAnswer(compiled: CompiledMatrix, traitIndex: number, t: number, random: Random, errorRate: number): Observation | undefined {
  const trait = compiled.traits[traitIndex];
  const n = compiled.taxonCount;
  const pattern = compiled.cellPattern[traitIndex * n + t];
  if (pattern === INAPPLICABLE_PATTERN) return undefined;
  if (trait.kind === 'numeric') {
    const span = spanOf(compiled, traitIndex);
    let value: number;
    if (pattern === UNKNOWN_PATTERN || random() < errorRate) {
      value = span.min + random() * (span.max - span.min);
    } else {
      const block = trait.numericIndex * 4 * n;
      const r = (field: number): number => compiled.ranges[block + field * n + t];
      const [min, low, high, max] = [r(RangeField.Min), r(RangeField.Low), r(RangeField.High), r(RangeField.Max)];
      const tails = low - min + (max - high);
      if (tails <= 0 || random() < MODEL.typicalShare) value = low + random() * (high - low);
      else {
        const at = random() * tails;
        value = at < low - min ? min + at : high + (at - (low - min));
      }
    }
    return { trait: trait.code, value: Math.round(value * 100) / 100 };
  }
  const k = trait.answerCount;
  let answer: number;
  if (pattern === UNKNOWN_PATTERN) {
    answer = Math.floor(random() * k);
  } else {
    const weights: number[] = [];
    for (let v = 0; v < k; v++) weights.push(FREQUENCY_WEIGHT[compiled.valueStatus[trait.likBase + pattern * k + v]] ?? 0);
    const total = weights.reduce((sum, weight) => sum + weight, 0);
    let pick = random() * total;
    answer = 0;
    while (answer < k - 1 && pick >= weights[answer]) pick -= weights[answer++];
    while (weights[answer] === 0 && answer > 0) answer--;
    if (k > 1 && random() < errorRate) {
      let wrong = Math.floor(random() * (k - 1));
      if (wrong >= answer) wrong++;
      answer = wrong;
    }
  }
  return { trait: trait.code, values: [trait.answerCodes[answer]] };
}

/** How the next trait is chosen in a simulated sift. */
export type Policy =
  { kind: 'engine'; lookaheadMaxCandidates?: number; assumeSeen?: boolean } | { kind: 'fixed'; order: number[] } | { kind: 'random'; random: Random };

export interface SiftOutcome {
  questions: number;
  leader: string;
  leaderProbability: number;
  top3: string[];
}

export interface SiftOptions {
  confidentAt: number;
  errorRate: number;
  /** strict elimination: a taxon with any conflict is dropped (scored with leeway 0, ranked by conflicts first) */
  strict?: boolean;
  maxQuestions?: number;
  /**
   * the tree does not always show what a question asks about: a trait is seen with its seeing chance
   * on a standing tree, month not given (flowers, fruit, cones), and otherwise asked and left unanswered
   */
  partsMissing?: boolean;
}

interface Standing {
  leader: string;
  probability: number;
  top3: string[];
  /** strict elimination: prior weights with every eliminated taxon at zero, for choosing the next question */
  survivorPriors?: Record<string, number>;
}

function standing(compiled: CompiledMatrix, observations: Observation[], strict: boolean): Standing {
  if (!strict) {
    const listed = rank(compiled, observations, { limit: 3, leeway: Infinity }).candidates;
    if (listed.length === 0) return { leader: '', probability: 0, top3: [] };
    return { leader: listed[0].taxonId, probability: listed[0].probability, top3: listed.map((candidate) => candidate.taxonId) };
  }
  // strict elimination: any conflict removes a taxon; survivors share the probability by prior weight
  const survivors = rank(compiled, observations, { limit: Infinity, leeway: 0 }).candidates;
  if (survivors.length === 0) return { leader: '', probability: 1, top3: [] };
  const weights = survivors.map((candidate) => compiled.priorWeight[compiled.taxonIndexById.get(candidate.taxonId) as number]);
  const total = weights.reduce((sum, weight) => sum + weight, 0);
  const order = survivors.map((candidate, i) => ({ id: candidate.taxonId, weight: weights[i] })).sort((x, y) => y.weight - x.weight);
  const survivorPriors = Object.fromEntries(compiled.taxa.map((info) => [info.id, 0]));
  for (const survivor of order) survivorPriors[survivor.id] = survivor.weight;
  return { leader: order[0].id, probability: order[0].weight / total, top3: order.slice(0, 3).map((item) => item.id), survivorPriors };
}

/** Simulates one sift for taxon t: answer the chosen trait each round until confident or nothing useful is left. */
export function simulateSift(compiled: CompiledMatrix, t: number, random: Random, policy: Policy, options: SiftOptions): SiftOutcome {
  const observations: Observation[] = [];
  const asked = new Set<string>();
  const strict = options.strict ?? false;
  const maxQuestions = options.maxQuestions ?? compiled.traits.length;
  let state = standing(compiled, observations, strict);
  while (asked.size < maxQuestions && state.probability < options.confidentAt) {
    let next: number | undefined;
    if (policy.kind === 'engine') {
      const [best] = suggest(compiled, observations, {
        limit: 1,
        exclude: [...asked],
        confidentAt: options.confidentAt,
        ...(policy.lookaheadMaxCandidates !== undefined && { lookaheadMaxCandidates: policy.lookaheadMaxCandidates }),
        ...(policy.assumeSeen === true && { assumeSeen: true }),
        ...(state.survivorPriors && { priors: state.survivorPriors }),
      });
      next = best ? compiled.traitIndexByCode.get(best.trait) : undefined;
    } else {
      const remaining = (policy.kind === 'fixed' ? policy.order : compiled.traits.map((_, j) => j)).filter((j) => !asked.has(compiled.traits[j].code));
      if (remaining.length > 0) next = policy.kind === 'fixed' ? remaining[0] : remaining[Math.floor(policy.random() * remaining.length)];
    }
    if (next === undefined) break;
    asked.add(compiled.traits[next].code);
    if (options.partsMissing === true && random() >= seeingChance(compiled.traits[next], 'standing-tree', undefined).chance) continue;
    const answer = drawAnswer(compiled, next, t, random, options.errorRate);
    if (answer) observations.push(answer);
    state = standing(compiled, observations, strict);
  }
  return { questions: asked.size, leader: state.leader, leaderProbability: state.probability, top3: state.top3 };
}
