/**
 * The preview of a suggestion: for each answer, the candidates that would lead and how many stay
 * within the leeway.
 *
 * Invariant: each answer lists at most three leaders, best first, each with a positive weight ×
 * likelihood; ties go to the lower working-set position, so a preview is deterministic.
 */
import { bandLabel } from './bands';
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, ValueStatus, type CompiledMatrix, type CompiledTrait } from './compiled';
import { answerRows, type Evaluated, type WorkingSet } from './answer-sums';
import type { Scored } from './scoring';
import type { SuggestionPreview } from './types';
import { answerLabelAt } from './words';

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
export function heaviestFirst(set: WorkingSet): Int32Array {
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
export interface LeewayCounts {
  below: number;
  atLeeway: number[];
}

export function leewayCounts(scored: Scored, leeway: number): LeewayCounts {
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

export function previewOf(compiled: CompiledMatrix, evaluated: Evaluated, set: WorkingSet, order: Int32Array, counts: LeewayCounts): SuggestionPreview[] {
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
