/**
 * buildKey: a printable two-way (dichotomous) key for a set of taxa.
 *
 * Invariant: every couplet has exactly two leads drawn from one trait, each lead leads to a strictly
 * smaller set than its couplet, and every taxon of the set is reachable; a taxon whose coding spans
 * both leads (or is not coded) is keyed out under both, as printed keys do.
 */
import { INAPPLICABLE_PATTERN, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import { requireTaxon } from './lookup';
import { rangeOf } from './separation';
import { answerLabelAt, formatNumber, joinOr } from './words';
import type { DichotomousKey, KeyCouplet, KeyLead, KeyNode } from './types';

/** most values for which every two-way grouping is tried; more are grouped greedily */
const EXHAUSTIVE_VALUES = 10;
/** a taxon that must be keyed out under both leads costs this much balance */
const BOTH_SIDES_PENALTY = 0.6;

type Side = 'left' | 'right' | 'both';

interface Split {
  trait: CompiledTrait;
  score: number;
  sides: Side[];
  /** discrete: answer indexes of the left lead */
  leftAnswers?: number[];
  rightAnswers?: number[];
  /** numeric: the cut in cm (left is below it) */
  cut?: number;
}

function answersOf(compiled: CompiledMatrix, trait: CompiledTrait, t: number): number[] | undefined {
  const pattern = compiled.cellPattern[trait.index * compiled.taxonCount + t];
  if (pattern === UNKNOWN_PATTERN || pattern === INAPPLICABLE_PATTERN) return undefined;
  const words = trait.words;
  const offset = trait.maskBase + pattern * 3 * words;
  const answers: number[] = [];
  for (let v = 0; v < trait.answerCount; v++) {
    const word = v >>> 5;
    const bit = 1 << (v & 31);
    if (((compiled.masks[offset + word] | compiled.masks[offset + words + word] | compiled.masks[offset + 2 * words + word]) & bit) !== 0) answers.push(v);
  }
  return answers;
}

function binaryEntropy(p: number): number {
  return p <= 0 || p >= 1 ? 0 : -p * Math.log2(p) - (1 - p) * Math.log2(1 - p);
}

/** Balanced, clean splits on easy, reliable traits score highest; a split that makes no progress scores -Infinity. */
function scoreSides(sides: readonly Side[], trait: CompiledTrait): number {
  let left = 0;
  let right = 0;
  let both = 0;
  for (const side of sides) {
    if (side === 'left') left++;
    else if (side === 'right') right++;
    else both++;
  }
  if (left === 0 || right === 0) return -Infinity;
  const balance = binaryEntropy(left / (left + right));
  return ((balance - (BOTH_SIDES_PENALTY * both) / sides.length) * (1 - trait.errorRate)) / Math.sqrt(trait.ease);
}

function groupings(present: number[]): number[][] {
  if (present.length <= EXHAUSTIVE_VALUES) {
    const result: number[][] = [];
    // the first value always on the left, so each two-way grouping appears once
    for (let mask = 0; mask < 1 << (present.length - 1); mask++) {
      const left = [present[0]];
      for (let i = 1; i < present.length; i++) if (mask & (1 << (i - 1))) left.push(present[i]);
      if (left.length < present.length) result.push(left);
    }
    return result;
  }
  return present.slice(1).map((_, i) => present.slice(0, i + 1));
}

function discreteSplit(compiled: CompiledMatrix, trait: CompiledTrait, taxa: readonly number[]): Split | undefined {
  const coded = taxa.map((t) => answersOf(compiled, trait, t));
  const patterns = taxa.map((t) => compiled.cellPattern[trait.index * compiled.taxonCount + t]);
  if (patterns.some((pattern) => pattern === INAPPLICABLE_PATTERN)) return undefined;
  const present = [...new Set(coded.flatMap((answers) => answers ?? []))].sort((a, b) => a - b);
  if (present.length < 2) return undefined;
  let best: Split | undefined;
  for (const left of groupings(present)) {
    const inLeft = new Set(left);
    const sides = coded.map((answers): Side => {
      if (!answers) return 'both';
      const leftCount = answers.filter((answer) => inLeft.has(answer)).length;
      return leftCount === answers.length ? 'left' : leftCount === 0 ? 'right' : 'both';
    });
    const score = scoreSides(sides, trait);
    if (!best || score > best.score) best = { trait, score, sides, leftAnswers: left, rightAnswers: present.filter((answer) => !inLeft.has(answer)) };
  }
  return best && best.score > -Infinity ? best : undefined;
}

function numericSplit(compiled: CompiledMatrix, trait: CompiledTrait, taxa: readonly number[]): Split | undefined {
  const n = compiled.taxonCount;
  if (taxa.some((t) => compiled.cellPattern[trait.index * n + t] === INAPPLICABLE_PATTERN)) return undefined;
  const ranges = taxa.map((t) => (compiled.cellPattern[trait.index * n + t] === UNKNOWN_PATTERN ? undefined : rangeOf(compiled, trait, t)));
  const ends = [...new Set(ranges.flatMap((range) => (range ? [range.low, range.high] : [])))].sort((a, b) => a - b);
  let best: Split | undefined;
  for (let i = 0; i + 1 < ends.length; i++) {
    const cut = (ends[i] + ends[i + 1]) / 2;
    const sides = ranges.map((range): Side => (!range ? 'both' : range.high < cut ? 'left' : range.low >= cut ? 'right' : 'both'));
    const score = scoreSides(sides, trait);
    if (!best || score > best.score) best = { trait, score, sides, cut: Number(cut.toPrecision(3)) };
  }
  return best && best.score > -Infinity ? best : undefined;
}

function bestSplit(compiled: CompiledMatrix, taxa: readonly number[]): Split | undefined {
  let best: Split | undefined;
  for (const trait of compiled.traits) {
    const split = trait.kind === 'numeric' ? numericSplit(compiled, trait, taxa) : discreteSplit(compiled, trait, taxa);
    if (split && (!best || split.score > best.score)) best = split;
  }
  return best;
}

function leadText(trait: CompiledTrait, answers: number[] | undefined, cut: number | undefined, below: boolean): string {
  if (cut !== undefined) return below ? `${trait.label} typically under ${formatNumber(cut)} cm` : `${trait.label} typically ${formatNumber(cut)} cm or more`;
  return `${trait.label}: ${joinOr((answers ?? []).map((answer) => answerLabelAt(trait, answer)))}`;
}

/** A two-way key for the given taxa (matrix order for ties); the client renders and prints the tree. */
export function buildKey(compiled: CompiledMatrix, ids: readonly string[]): DichotomousKey {
  const taxa = [...new Set(ids)].map((id) => requireTaxon(compiled, id));
  let couplets = 0;
  const build = (set: readonly number[], depth: number): KeyNode => {
    const end: KeyNode = { kind: 'taxa', taxa: set.map((t) => compiled.taxa[t].id) };
    if (set.length < 2 || depth > 64) return end;
    const split = bestSplit(compiled, set);
    if (!split) return end;
    const left = set.filter((_, i) => split.sides[i] !== 'right');
    const right = set.filter((_, i) => split.sides[i] !== 'left');
    if (left.length >= set.length || right.length >= set.length) return end;
    const couplet: KeyCouplet = { kind: 'couplet', number: ++couplets, trait: split.trait.code, leads: [] as unknown as [KeyLead, KeyLead] };
    const lead = (members: readonly number[], answers: number[] | undefined, below: boolean): KeyLead => ({
      text: leadText(split.trait, answers, split.cut, below),
      trait: split.trait.code,
      ...(answers && { values: answers.map((answer) => split.trait.answerCodes[answer]) }),
      ...(split.cut !== undefined && { range: below ? { to: split.cut } : { from: split.cut } }),
      next: build(members, depth + 1),
    });
    const first = lead(left, split.leftAnswers, true);
    const second = lead(right, split.rightAnswers, false);
    couplet.leads = [first, second];
    return couplet;
  };
  const root = build(taxa, 0);
  return { taxa: taxa.map((t) => compiled.taxa[t].id), root, couplets };
}

/** The key as numbered lines (`1a. … → 2`, `1b. … → Pinus taeda`), for printing and plain-text export. */
export function keyToLines(compiled: CompiledMatrix, key: DichotomousKey): string[] {
  const lines: string[] = [];
  const name = (id: string): string => compiled.taxa[requireTaxon(compiled, id)].scientificName;
  const visit = (node: KeyNode): void => {
    if (node.kind !== 'couplet') return;
    node.leads.forEach((lead, i) => {
      const target = lead.next.kind === 'couplet' ? String(lead.next.number) : lead.next.taxa.map(name).join(' / ');
      lines.push(`${node.number}${i === 0 ? 'a' : 'b'}. ${lead.text} → ${target}`);
    });
    node.leads.forEach((lead) => visit(lead.next));
  };
  visit(key.root);
  return lines;
}
