/**
 * The preview of a suggestion: for each answer, which shortlisted species are coded with it and how
 * many of the species holding most of the probability would fit it.
 *
 * Invariant: answers come most likely first (by current probability mass; ties in answer order);
 * an answer no shortlisted species is coded with is left out; each answer lists at most three
 * species, all coded with that answer, most probable first (ties: lower working-set position), so a
 * preview is deterministic; `remaining` counts the species of the core (the most probable species
 * that together hold PREVIEW_CORE_SHARE of the probability) coded with that answer.
 */
import { bandLabel } from './bands';
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, ValueStatus, type CompiledMatrix } from './compiled-matrix';
import type { Evaluated, WorkingSet } from './answer-sums';
import type { SuggestionPreview } from './types';
import { answerLabelAt } from './words';

/** the core of a preview count: the most probable species that together hold this share of the probability */
export const PREVIEW_CORE_SHARE = 0.95;
/** most species a preview line lists */
const PREVIEW_LEADERS = 3;

/** Whether taxon t is coded with answer `a` (a value it shows at any frequency, or a range reaching into the band). */
export function codedWith(compiled: CompiledMatrix, evaluated: Evaluated, t: number, a: number): boolean {
  const trait = evaluated.trait;
  const n = compiled.taxonCount;
  const pattern = compiled.cellPattern[trait.index * n + t] ?? UNKNOWN_PATTERN;
  if (pattern === UNKNOWN_PATTERN || pattern === INAPPLICABLE_PATTERN) return false;
  if (trait.kind !== 'numeric') {
    const status = compiled.valueStatus[trait.likBase + pattern * trait.answerCount + a];
    return status === ValueStatus.Usual || status === ValueStatus.Occasional || status === ValueStatus.Rare;
  }
  const cuts = evaluated.cuts ?? [];
  const from = a === 0 ? -Infinity : (cuts[a - 1] ?? -Infinity);
  const to = a === cuts.length ? Infinity : (cuts[a] ?? Infinity);
  const block = trait.numericIndex * 4 * n;
  const min = compiled.ranges[block + RangeField.Min * n + t] ?? NaN;
  const max = compiled.ranges[block + RangeField.Max * n + t] ?? NaN;
  return max >= from && min < to;
}

/** Working-set positions, heaviest first (equal weights: lower position first). */
export function heaviestFirst(set: WorkingSet): Int32Array {
  const order = Int32Array.from({ length: set.members.length }, (_, i) => i);
  return order.sort((a, b) => (set.weight[b] ?? 0) - (set.weight[a] ?? 0) || a - b);
}

/** How many of the heaviest positions (in `order`) it takes to hold PREVIEW_CORE_SHARE of the weight. */
export function coreSize(set: WorkingSet, order: Int32Array): number {
  let held = 0;
  let size = 0;
  for (const i of order) {
    if (held >= PREVIEW_CORE_SHARE - 1e-12) break;
    held += set.weight[i] ?? 0;
    size++;
  }
  return size;
}

/**
 * The preview of one evaluated trait. `shortlist` is the set of taxon indices a trait must split
 * (those within a share of the leader); `order` the working set heaviest first.
 */
export function previewOf(
  compiled: CompiledMatrix,
  evaluated: Evaluated,
  set: WorkingSet,
  order: Int32Array,
  shortlist: ReadonlySet<number>,
): SuggestionPreview[] {
  const trait = evaluated.trait;
  const isNumeric = trait.kind === 'numeric';
  const answers = evaluated.sums.mass.length;
  const core = coreSize(set, order);
  const leaders: string[][] = Array.from({ length: answers }, () => []);
  const remaining = new Int32Array(answers);
  // heaviest first, so the shortlist (a share of the leader's probability) and the core both come first: stop past both
  for (let rank = 0; rank < order.length; rank++) {
    const t = set.members[order[rank] ?? 0] ?? -1;
    const inShortlist = shortlist.has(t);
    if (rank >= core && !inShortlist) break;
    for (let a = 0; a < answers; a++) {
      if (!codedWith(compiled, evaluated, t, a)) continue;
      if (rank < core) remaining[a] = (remaining[a] ?? 0) + 1;
      const listed = leaders[a];
      const taxon = compiled.taxa[t];
      if (inShortlist && listed && taxon && listed.length < PREVIEW_LEADERS) listed.push(taxon.id);
    }
  }
  const lines: Array<{ a: number; mass: number; line: SuggestionPreview }> = [];
  for (let a = 0; a < answers; a++) {
    const listed = leaders[a] ?? [];
    if (listed.length === 0) continue;
    const label = isNumeric ? bandLabel(evaluated.cuts ?? [], a) : answerLabelAt(trait, a);
    const mass = evaluated.sums.mass[a] ?? 0;
    lines.push({
      a,
      mass,
      line: { answer: isNumeric ? label : (trait.answerCodes[a] ?? label), label, probability: mass, leaders: listed, remaining: remaining[a] ?? 0 },
    });
  }
  lines.sort((x, y) => y.mass - x.mass || x.a - y.a);
  return lines.map(({ line }) => line);
}
