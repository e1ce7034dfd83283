/**
 * Conflict counting with bitsets. Each scored observation gives one bit per taxon, set where the
 * taxon's coding contradicts it; the bitsets are added into bit-sliced counters (plane p holds bit
 * p of every taxon's count), 32 taxa per word, and the counts are then spread into one byte (or
 * short) per taxon.
 *
 * Invariant: bits at positions ≥ taxonCount are always 0, so the last word's padding never counts.
 */
import { ValueStatus, type CompiledMatrix, type CompiledTrait } from './compiled';
import type { PreparedSet } from './observations';

/** 32-bit words needed for one bit per taxon. */
export function wordsFor(taxonCount: number): number {
  return (taxonCount + 31) >>> 5;
}

/**
 * A byte-per-taxon count array whose buffer is padded to whole words of 32 taxa, so counts can be
 * added four taxa at a time through a Uint32Array view of the same memory.
 */
export function paddedCounts(taxonCount: number): Uint8Array {
  return new Uint8Array(new ArrayBuffer(wordsFor(taxonCount) * 32), 0, taxonCount);
}

function isConflict(status: number): boolean {
  return status === ValueStatus.NotCoded || status === ValueStatus.Inapplicable;
}

const answerBits = new WeakMap<CompiledMatrix, Map<number, Uint32Array>>();

/**
 * Bit t set where `answer` of `trait` is neither coded nor possible for taxon t (not coded, or the
 * trait does not apply). Derived from the matrix once per trait and answer, then kept with it.
 */
export function answerConflictBits(compiled: CompiledMatrix, trait: CompiledTrait, answer: number): Uint32Array {
  let byKey = answerBits.get(compiled);
  if (!byKey) {
    byKey = new Map();
    answerBits.set(compiled, byKey);
  }
  const key = trait.likBase + answer;
  const known = byKey.get(key);
  if (known) return known;
  const n = compiled.taxonCount;
  const flags = new Uint8Array(trait.patternCount);
  for (let p = 0; p < trait.patternCount; p++) flags[p] = +isConflict(compiled.valueStatus[trait.likBase + p * trait.answerCount + answer]);
  const bits = new Uint32Array(wordsFor(n));
  const column = trait.index * n;
  for (let t = 0; t < n; t++) bits[t >>> 5] |= flags[compiled.cellPattern[column + t]] << (t & 31);
  byKey.set(key, bits);
  return bits;
}

/**
 * Conflict bits of a set observation: a taxon conflicts when none of the answers is coded for it.
 * One answer returns the matrix's shared bits (read only); several are combined into `scratch`.
 */
export function setConflictBits(compiled: CompiledMatrix, observation: PreparedSet, scratch: () => Uint32Array): Uint32Array {
  const answers = observation.answers;
  const first = answerConflictBits(compiled, observation.trait, answers[0]);
  if (answers.length === 1) return first;
  const bits = scratch();
  bits.set(first);
  for (let a = 1; a < answers.length; a++) {
    const other = answerConflictBits(compiled, observation.trait, answers[a]);
    for (let w = 0; w < bits.length; w++) bits[w] &= other[w];
  }
  return bits;
}

/** SPREAD[2 * b] and SPREAD[2 * b + 1]: the eight bits of byte b as eight bytes of 0 or 1 (little-endian words). */
const SPREAD = new Uint32Array(512);
for (let b = 0; b < 256; b++) {
  SPREAD[2 * b] = (b & 1) | (((b >>> 1) & 1) << 8) | (((b >>> 2) & 1) << 16) | (((b >>> 3) & 1) << 24);
  SPREAD[2 * b + 1] = ((b >>> 4) & 1) | (((b >>> 5) & 1) << 8) | (((b >>> 6) & 1) << 16) | (((b >>> 7) & 1) << 24);
}
const LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;

/** Bit-sliced counters, one per taxon, with room for counts up to 2^planeCount − 1. */
export class ConflictCounter {
  readonly words: number;
  private planes: Uint32Array;
  private planeCount: number;

  /** `most` is the largest count that can occur (the number of observations added). */
  constructor(taxonCount: number, most: number, reuse?: Uint32Array) {
    this.words = wordsFor(taxonCount);
    this.planeCount = Math.max(1, 32 - Math.clz32(most));
    const size = this.words * this.planeCount;
    this.planes = reuse && reuse.length >= size ? reuse.subarray(0, size).fill(0) : new Uint32Array(size);
  }

  /** The plane storage, for reuse by the next counter of the same matrix. */
  get storage(): Uint32Array {
    return this.planes;
  }

  /** Adds 1 to the count of every taxon whose bit is set. */
  add(bits: Uint32Array): void {
    const planes = this.planes;
    const words = this.words;
    const last = this.planeCount;
    for (let w = 0; w < words; w++) {
      let carry = bits[w];
      for (let p = 0; carry !== 0 && p < last; p++) {
        const at = p * words + w;
        const plane = planes[at];
        planes[at] = plane ^ carry;
        carry = plane & carry;
      }
    }
  }

  /** Writes each taxon's count into `counts` (which must be zero), four taxa per addition where it can. */
  spreadInto(counts: Uint8Array | Uint16Array): void {
    const planes = this.planes;
    const words = this.words;
    const fast = LITTLE_ENDIAN && counts instanceof Uint8Array && counts.byteOffset % 4 === 0 && counts.buffer.byteLength - counts.byteOffset >= words * 32 && this.planeCount <= 8;
    if (fast) {
      const view = new Uint32Array(counts.buffer, counts.byteOffset, words * 8);
      for (let p = 0; p < this.planeCount; p++) {
        for (let w = 0; w < words; w++) {
          const x = planes[p * words + w];
          if (x === 0) continue;
          const base = w * 8;
          for (let q = 0; q < 4; q++) {
            const b = (x >>> (8 * q)) & 255;
            if (b === 0) continue;
            view[base + 2 * q] += SPREAD[2 * b] << p;
            view[base + 2 * q + 1] += SPREAD[2 * b + 1] << p;
          }
        }
      }
      return;
    }
    const n = counts.length;
    for (let p = 0; p < this.planeCount; p++) {
      for (let t = 0; t < n; t++) counts[t] += ((planes[p * words + (t >>> 5)] >>> (t & 31)) & 1) << p;
    }
  }
}
