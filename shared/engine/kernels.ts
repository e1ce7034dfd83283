/**
 * The scoring kernels: likelihood columns combined ten or five at a time, so each taxon's score is
 * written once per group of observations.
 *
 * Invariant: for every taxon t, a pass writes score[t] = from[t] × (on the log scale, +) the
 * group's factors at t's codes, and a padding column contributes the identity (1, or 0 for logs).
 */
import type { CompiledMatrix } from './compiled-matrix';
import { LITTLE_ENDIAN, unknownColumnOf, type ScoreColumn } from './likelihood-columns';

function codesOf(columns: readonly ScoreColumn[], o: number, count: number): Uint16Array[] {
  return columns.slice(o, o + count).map((column) => column.codes);
}

/** The factor tables of one pass. */
function factorsOf(columns: readonly ScoreColumn[], o: number, count: number): Float64Array[] {
  return columns.slice(o, o + count).map((column) => column.factor);
}

/** Ten columns into the scores in one pass: score = from × (or +) their ten factors. Exported for tests. */
export function addTen(columns: readonly ScoreColumn[], o: number, from: Float64Array, score: Float64Array, linear: boolean): void {
  const [c0, c1, c2, c3, c4, c5, c6, c7, c8, c9] = codesOf(columns, o, 10);
  const [v0, v1, v2, v3, v4, v5, v6, v7, v8, v9] = factorsOf(columns, o, 10);
  const n = score.length;
  // two copies of one loop, so neither branches on the scale per taxon
  if (linear) {
    for (let t = 0; t < n; t++)
      score[t] = from[t] * (v0[c0[t]] * v1[c1[t]] * v2[c2[t]] * v3[c3[t]] * v4[c4[t]] * v5[c5[t]] * v6[c6[t]] * v7[c7[t]] * v8[c8[t]] * v9[c9[t]]);
  } else {
    for (let t = 0; t < n; t++)
      score[t] = from[t] + (v0[c0[t]] + v1[c1[t]] + v2[c2[t]] + v3[c3[t]] + v4[c4[t]] + v5[c5[t]] + v6[c6[t]] + v7[c7[t]] + v8[c8[t]] + v9[c9[t]]);
  }
}

/**
 * addTen for plain products, two taxa per step: each column is read as 32-bit words holding the
 * codes of taxa 2i (low half) and 2i + 1 (high half), halving the reads and their bounds checks.
 * Gives exactly addTen's products. Needs an even taxon count and word-aligned columns. Exported for tests.
 */
export function addTenByPairs(columns: readonly ScoreColumn[], o: number, from: Float64Array, score: Float64Array): void {
  const [c0, c1, c2, c3, c4, c5, c6, c7, c8, c9] = codesOf(columns, o, 10).map(pairsOf);
  const [v0, v1, v2, v3, v4, v5, v6, v7, v8, v9] = factorsOf(columns, o, 10);
  const m = c0.length;
  for (let i = 0; i < m; i++) {
    const a0 = c0[i];
    const a1 = c1[i];
    const a2 = c2[i];
    const a3 = c3[i];
    const a4 = c4[i];
    const a5 = c5[i];
    const a6 = c6[i];
    const a7 = c7[i];
    const a8 = c8[i];
    const a9 = c9[i];
    const t = i << 1;
    score[t] =
      from[t] *
      (v0[a0 & 0xffff] *
        v1[a1 & 0xffff] *
        v2[a2 & 0xffff] *
        v3[a3 & 0xffff] *
        v4[a4 & 0xffff] *
        v5[a5 & 0xffff] *
        v6[a6 & 0xffff] *
        v7[a7 & 0xffff] *
        v8[a8 & 0xffff] *
        v9[a9 & 0xffff]);
    score[t + 1] =
      from[t + 1] *
      (v0[a0 >>> 16] *
        v1[a1 >>> 16] *
        v2[a2 >>> 16] *
        v3[a3 >>> 16] *
        v4[a4 >>> 16] *
        v5[a5 >>> 16] *
        v6[a6 >>> 16] *
        v7[a7 >>> 16] *
        v8[a8 >>> 16] *
        v9[a9 >>> 16]);
  }
}

/** A code column as 32-bit words, two taxa each (see addTenByPairs). */
function pairsOf(codes: Uint16Array): Int32Array {
  return new Int32Array(codes.buffer, codes.byteOffset, codes.length >>> 1);
}

/** Whether addTenByPairs can read these columns: an even count of taxa, enough of them to pay for the views, aligned words. */
function pairable(columns: readonly ScoreColumn[], o: number, n: number): boolean {
  if (!LITTLE_ENDIAN || n % 2 !== 0 || n < 64) return false;
  for (let k = o; k < o + 10; k++) if (columns[k].codes.byteOffset % 4 !== 0) return false;
  return true;
}

/** Five columns into the scores in one pass: score = from × (or +) their five factors. */
function addFive(columns: readonly ScoreColumn[], o: number, from: Float64Array, score: Float64Array, linear: boolean): void {
  const [c0, c1, c2, c3, c4] = codesOf(columns, o, 5);
  const [v0, v1, v2, v3, v4] = factorsOf(columns, o, 5);
  const n = score.length;
  if (linear) {
    for (let t = 0; t < n; t++) score[t] = from[t] * (v0[c0[t]] * v1[c1[t]] * v2[c2[t]] * v3[c3[t]] * v4[c4[t]]);
  } else {
    for (let t = 0; t < n; t++) score[t] = from[t] + (v0[c0[t]] + v1[c1[t]] + v2[c2[t]] + v3[c3[t]] + v4[c4[t]]);
  }
}

/**
 * Writes `score` = `start` combined with every column, in as few passes over the taxa as possible:
 * ten columns at a time, then five (a short last group is padded with a column of unknown cells
 * that adds nothing), so each taxon's running score is read and written once per group instead of
 * once per observation. Multiplies plain likelihoods when `linear`, else adds their logs.
 */
export function addColumns(compiled: CompiledMatrix, columns: ScoreColumn[], start: Float64Array, score: Float64Array, linear: boolean): void {
  if (columns.length === 0) {
    score.set(start);
    return;
  }
  const tail = columns.length % 10;
  const padding = tail === 0 ? 0 : (5 - (tail % 5)) % 5;
  if (padding > 0) {
    const nothing: ScoreColumn = { codes: unknownColumnOf(compiled), factor: new Float64Array([linear ? 1 : 0]) };
    columns = [...columns, ...Array.from({ length: padding }, () => nothing)];
  }
  let from = start;
  let o = 0;
  for (; o + 10 <= columns.length; o += 10) {
    if (linear && pairable(columns, o, score.length)) addTenByPairs(columns, o, from, score);
    else addTen(columns, o, from, score, linear);
    from = score;
  }
  for (; o < columns.length; o += 5) {
    addFive(columns, o, from, score, linear);
    from = score;
  }
}
