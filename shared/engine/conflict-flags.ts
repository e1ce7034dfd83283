/**
 * Conflict counting with flag columns: one byte per taxon, 1 where the taxon's coding contradicts an
 * observation. A set observation's flags depend only on its trait and answers, so each answer's
 * column is derived from the matrix once and kept with it; adding a column to the per-taxon counts
 * then takes one 32-bit addition per four taxa.
 *
 * Invariant: every flag and count array made here has a buffer padded to a whole number of 32-bit
 * words, and the padding bytes stay 0.
 */
import { ValueStatus, type CompiledMatrix, type CompiledTrait } from './compiled';
import type { PreparedSet } from './observations';

/** A byte per taxon, its buffer padded to whole 32-bit words so it can be read four taxa at a time. */
export function paddedBytes(taxonCount: number): Uint8Array {
  return new Uint8Array(new ArrayBuffer(Math.ceil(taxonCount / 4) * 4), 0, taxonCount);
}

/** The 32-bit words over a paddedBytes array: four taxa per word. */
export function wordsOf(bytes: Uint8Array): Uint32Array {
  return new Uint32Array(bytes.buffer, bytes.byteOffset, Math.ceil(bytes.length / 4));
}

function isConflict(status: number): boolean {
  return status === ValueStatus.NotCoded || status === ValueStatus.Inapplicable;
}

const answerFlags = new WeakMap<CompiledMatrix, Map<number, Uint32Array>>();

/**
 * A byte of 1 for each taxon for which `answer` of `trait` is neither coded nor possible (not coded,
 * or the trait does not apply), packed four taxa per word. Derived from the matrix once per trait
 * and answer, then kept with it.
 */
export function answerConflictFlags(compiled: CompiledMatrix, trait: CompiledTrait, answer: number): Uint32Array {
  let byKey = answerFlags.get(compiled);
  if (!byKey) {
    byKey = new Map();
    answerFlags.set(compiled, byKey);
  }
  const key = trait.likBase + answer;
  const known = byKey.get(key);
  if (known) return known;
  const n = compiled.taxonCount;
  const byPattern = new Uint8Array(trait.patternCount);
  for (let p = 0; p < trait.patternCount; p++) byPattern[p] = +isConflict(compiled.valueStatus[trait.likBase + p * trait.answerCount + answer]);
  const flags = paddedBytes(n);
  const column = trait.index * n;
  for (let t = 0; t < n; t++) flags[t] = byPattern[compiled.cellPattern[column + t]];
  const words = wordsOf(flags);
  byKey.set(key, words);
  return words;
}

/**
 * Conflict flags of a set observation: a taxon conflicts when none of the answers is coded for it.
 * One answer returns the matrix's shared column (read only); several are combined into `scratch`.
 */
export function setConflictFlags(compiled: CompiledMatrix, observation: PreparedSet, scratch: () => Uint32Array): Uint32Array {
  const answers = observation.answers;
  const first = answerConflictFlags(compiled, observation.trait, answers[0]);
  if (answers.length === 1) return first;
  const flags = scratch();
  flags.set(first);
  for (let a = 1; a < answers.length; a++) {
    const other = answerConflictFlags(compiled, observation.trait, answers[a]);
    // flags are 0 or 1 per byte, so a word's AND is the AND of its four taxa
    for (let w = 0; w < flags.length; w++) flags[w] &= other[w];
  }
  return flags;
}

/**
 * Per-taxon conflict counts: bytes (fewer than 256 observations, so no byte ever passes 255) with
 * their words, so a flag column adds four taxa per 32-bit addition and no byte carries into the
 * next; or shorts, added a taxon at a time.
 */
export class ConflictCounts {
  readonly counts: Uint8Array | Uint16Array;
  private readonly words: Uint32Array | undefined;

  constructor(counts: Uint8Array | Uint16Array, words?: Uint32Array) {
    this.counts = counts;
    this.words = counts instanceof Uint8Array ? (words ?? wordsOf(counts)) : undefined;
  }

  add(flags: Uint32Array): void {
    const words = this.words;
    if (words) {
      for (let w = 0; w < words.length; w++) words[w] += flags[w];
      return;
    }
    const counts = this.counts;
    const bytes = new Uint8Array(flags.buffer, flags.byteOffset, counts.length);
    for (let t = 0; t < counts.length; t++) counts[t] += bytes[t];
  }
}
