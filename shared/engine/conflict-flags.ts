/**
 * Conflict counting with flag columns: one byte per taxon, 1 where the taxon's coding contradicts an
 * observation. A set observation's flags depend only on its trait and answers, so each answer's
 * column is derived from the matrix once and kept with it; adding a column to the per-taxon counts
 * then takes one 32-bit addition per four taxa.
 *
 * Invariant: every flag and count array made here has a buffer padded to a whole number of 32-bit
 * words, and the padding bytes stay 0.
 */
import { ValueStatus, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import type { PreparedSet } from './observations';

/** A byte per taxon, its buffer padded to whole 32-bit words so it can be read four taxa at a time. */
export function paddedBytes(taxonCount: number): Uint8Array {
  return new Uint8Array(new ArrayBuffer(Math.ceil(taxonCount / 4) * 4), 0, taxonCount);
}

/** The 32-bit words over a paddedBytes array: four taxa per word (signed, so additions stay in integers). */
export function wordsOf(bytes: Uint8Array): Int32Array {
  return new Int32Array(bytes.buffer, bytes.byteOffset, Math.ceil(bytes.length / 4));
}

function isConflict(status: number): boolean {
  return status === ValueStatus.NotCoded || status === ValueStatus.Inapplicable;
}

const answerFlags = new WeakMap<CompiledMatrix, Map<number, Int32Array>>();

/**
 * A byte of 1 for each taxon for which `answer` of `trait` is neither coded nor possible (not coded,
 * or the trait does not apply), packed four taxa per word. Derived from the matrix once per trait
 * and answer, then kept with it.
 */
export function answerConflictFlags(compiled: CompiledMatrix, trait: CompiledTrait, answer: number): Int32Array {
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
export function setConflictFlags(compiled: CompiledMatrix, observation: PreparedSet, scratch: () => Int32Array): Int32Array {
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
 * their words, so flag columns add four taxa per 32-bit addition, four columns per pass, and no
 * byte carries into the next; or shorts, added a taxon at a time.
 */
export class ConflictCounts {
  readonly counts: Uint8Array | Uint16Array;
  private readonly words: Int32Array | undefined;
  private readonly pending: Int32Array[] = [];

  constructor(counts: Uint8Array | Uint16Array, words?: Int32Array) {
    this.counts = counts;
    this.words = counts instanceof Uint8Array ? (words ?? wordsOf(counts)) : undefined;
  }

  /** Counts a flag column in (it must stay unchanged until `flush`). */
  add(flags: Int32Array): void {
    this.pending.push(flags);
  }

  /** Adds every column given since the last flush. */
  flush(): void {
    const pending = this.pending;
    const words = this.words;
    if (!words) {
      const counts = this.counts;
      for (const flags of pending) {
        const bytes = new Uint8Array(flags.buffer, flags.byteOffset, counts.length);
        for (let t = 0; t < counts.length; t++) counts[t] += bytes[t];
      }
      pending.length = 0;
      return;
    }
    const m = words.length;
    let i = 0;
    // 32-bit integer additions: no byte carries, so the wrap-around of the sign bit is harmless
    for (; i + 4 <= pending.length; i += 4) {
      const f0 = pending[i];
      const f1 = pending[i + 1];
      const f2 = pending[i + 2];
      const f3 = pending[i + 3];
      for (let w = 0; w < m; w++) words[w] = (words[w] + f0[w] + f1[w] + f2[w] + f3[w]) | 0;
    }
    for (; i < pending.length; i++) {
      const f0 = pending[i];
      for (let w = 0; w < m; w++) words[w] = (words[w] + f0[w]) | 0;
    }
    pending.length = 0;
  }
}
