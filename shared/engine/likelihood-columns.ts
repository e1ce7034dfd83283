/**
 * Likelihood columns: each observation as a column of small codes per taxon with one factor per
 * code (a set observation's codes are its trait's pattern column; a measurement's say where it
 * falls against each taxon's range and whether that conflicts).
 *
 * Invariant: every factor is finite and > 0 (every likelihood is > 0), and a column's codes index
 * its factors, so combining columns never reads past a table or multiplies by 0 or NaN.
 */
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import { MODEL } from './defaults';
import type { PreparedMeasure, PreparedSet } from './observations';

/** Likelihood (capped at 1) and its log of a set observation for every pattern of its trait. */
export function setTables(compiled: CompiledMatrix, observation: PreparedSet): { logs: Float64Array; likelihood: Float64Array } {
  const trait = observation.trait;
  const k = trait.answerCount;
  const logs = new Float64Array(trait.patternCount);
  const likelihood = new Float64Array(trait.patternCount);
  for (let p = 0; p < trait.patternCount; p++) {
    const base = trait.likBase + p * k;
    let sum = 0;
    for (const answer of observation.answers) sum += compiled.likelihood[base + answer];
    const value = Math.min(1, sum);
    likelihood[p] = value;
    logs[p] = observation.answers.length === 1 ? compiled.logLikelihood[base + observation.answers[0]] : Math.log(value);
  }
  return { logs, likelihood };
}

/** Where a measurement falls for one taxon. */
export type MeasureRegion = 'typical' | 'extreme' | 'outside' | 'unknown' | 'inapplicable';

export function measureRegion(compiled: CompiledMatrix, observation: PreparedMeasure, t: number): MeasureRegion {
  const n = compiled.taxonCount;
  const pattern = compiled.cellPattern[observation.trait.index * n + t];
  if (pattern === UNKNOWN_PATTERN) return 'unknown';
  if (pattern === INAPPLICABLE_PATTERN) return 'inapplicable';
  const block = observation.trait.numericIndex * 4 * n;
  const x = observation.centimetres;
  const ranges = compiled.ranges;
  if (x >= ranges[block + RangeField.Low * n + t] && x <= ranges[block + RangeField.High * n + t]) return 'typical';
  if (x >= ranges[block + RangeField.Min * n + t] && x <= ranges[block + RangeField.Max * n + t]) return 'extreme';
  return 'outside';
}

/** The likelihood the scorer gives each measurement region on a trait with error rate `errorRate`. */
export function regionLikelihood(region: MeasureRegion, errorRate: number): number {
  switch (region) {
    case 'typical':
      return MODEL.typicalScore;
    case 'extreme':
      return MODEL.extremeScore;
    case 'unknown':
      return MODEL.unknownNumericScore;
    case 'outside':
    case 'inapplicable':
      return errorRate;
  }
}

/** A column of small codes per taxon and, per code, the factor it multiplies (or adds). */
export interface ScoreColumn {
  codes: Uint16Array;
  factor: Float64Array;
}

const answerFactors = new WeakMap<CompiledMatrix, Map<number, { likelihood: Float64Array; logs: Float64Array }>>();

/** The factor tables of a set observation; those of a single answer are derived once per matrix and kept with it. */
function factorTables(compiled: CompiledMatrix, observation: PreparedSet): { likelihood: Float64Array; logs: Float64Array } {
  if (observation.answers.length !== 1) return setTables(compiled, observation);
  let byKey = answerFactors.get(compiled);
  if (!byKey) {
    byKey = new Map();
    answerFactors.set(compiled, byKey);
  }
  const key = observation.trait.likBase + observation.answers[0];
  let tables = byKey.get(key);
  if (!tables) {
    tables = setTables(compiled, observation);
    byKey.set(key, tables);
  }
  return tables;
}

/** A set observation's column is its trait's pattern column; its factors are indexed by pattern. */
export function setColumn(compiled: CompiledMatrix, observation: PreparedSet, linear: boolean): ScoreColumn {
  const n = compiled.taxonCount;
  const index = observation.trait.index;
  const tables = factorTables(compiled, observation);
  return { codes: compiled.cellPattern.subarray(index * n, (index + 1) * n), factor: linear ? tables.likelihood : tables.logs };
}

// measurement codes: pattern * 3 + region, rows by pattern (unknown, inapplicable, coded range),
// columns by region (typical, extreme, outside)
const MEASURE_CONFLICT = Uint8Array.from([0, 0, 0, 1, 1, 1, 0, 0, 1]);

/** Whether the low half of a 32-bit word is the first of its two 16-bit halves in memory. */
export const LITTLE_ENDIAN = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1;

/**
 * A measurement's column: where it falls for each taxon, as pattern * 3 + region; its conflicts are
 * added to `conflicts` on the way. Branch-free on purpose (where a measurement falls is
 * unpredictable from taxon to taxon); the range comparisons of a cell that is not a coded range are
 * made but their region is scored like the others of its row. A numeric trait's patterns are only
 * UNKNOWN_PATTERN (0), INAPPLICABLE_PATTERN (1) and CODED_RANGE_PATTERN (2).
 */
export function measureColumn(
  compiled: CompiledMatrix,
  observation: PreparedMeasure,
  linear: boolean,
  codes: Uint16Array,
  conflicts: Uint8Array | Uint16Array,
): ScoreColumn {
  const n = compiled.taxonCount;
  const columnBase = observation.trait.index * n;
  const block = observation.trait.numericIndex * 4 * n;
  const minBase = block + RangeField.Min * n;
  const lowBase = block + RangeField.Low * n;
  const highBase = block + RangeField.High * n;
  const maxBase = block + RangeField.Max * n;
  const x = observation.centimetres;
  const patterns = compiled.cellPattern;
  const ranges = compiled.ranges;
  // compiled ranges are ordered (min ≤ low ≤ high ≤ max), so the four comparisons that hold are
  // 4 inside the typical range, 3 inside the recorded one only, 2 outside: region = 4 − held
  const patternOffset = patterns.byteOffset + columnBase * 2;
  if (
    LITTLE_ENDIAN &&
    n % 2 === 0 &&
    n >= 64 &&
    conflicts instanceof Uint8Array &&
    patternOffset % 4 === 0 &&
    codes.byteOffset % 4 === 0 &&
    conflicts.byteOffset % 2 === 0
  ) {
    // two taxa per step: their patterns and codes as one 32-bit word, their conflicts as one 16-bit
    // addition (counts stay below 256, so no byte carries into the next)
    const pairs = n >>> 1;
    const patternPairs = new Int32Array(patterns.buffer, patternOffset, pairs);
    const codePairs = new Int32Array(codes.buffer, codes.byteOffset, pairs);
    const conflictPairs = new Uint16Array(conflicts.buffer, conflicts.byteOffset, pairs);
    for (let i = 0; i < pairs; i++) {
      const t = i << 1;
      const both = patternPairs[i];
      const held0 = +(x >= ranges[minBase + t]) + +(x >= ranges[lowBase + t]) + +(x <= ranges[highBase + t]) + +(x <= ranges[maxBase + t]);
      const held1 = +(x >= ranges[minBase + t + 1]) + +(x >= ranges[lowBase + t + 1]) + +(x <= ranges[highBase + t + 1]) + +(x <= ranges[maxBase + t + 1]);
      const code0 = (both & 0xffff) * 3 + 4 - held0;
      const code1 = (both >>> 16) * 3 + 4 - held1;
      codePairs[i] = code0 | (code1 << 16);
      conflictPairs[i] += MEASURE_CONFLICT[code0] | (MEASURE_CONFLICT[code1] << 8);
    }
  } else {
    for (let t = 0; t < n; t++) {
      const held = +(x >= ranges[minBase + t]) + +(x >= ranges[lowBase + t]) + +(x <= ranges[highBase + t]) + +(x <= ranges[maxBase + t]);
      const code = patterns[columnBase + t] * 3 + 4 - held;
      codes[t] = code;
      conflicts[t] += MEASURE_CONFLICT[code];
    }
  }
  const factors = measureFactors(observation.trait);
  return { codes, factor: linear ? factors.likelihood : factors.logs };
}

const traitMeasureFactors = new WeakMap<CompiledTrait, { likelihood: Float64Array; logs: Float64Array }>();

/** A numeric trait's factor per measurement code, plain and as logs; built once per trait. */
function measureFactors(trait: CompiledTrait): { likelihood: Float64Array; logs: Float64Array } {
  let factors = traitMeasureFactors.get(trait);
  if (!factors) {
    const e = trait.errorRate;
    const u = MODEL.unknownNumericScore;
    const likelihood = Float64Array.of(u, u, u, e, e, e, MODEL.typicalScore, MODEL.extremeScore, e);
    factors = { likelihood, logs: likelihood.map(Math.log) };
    traitMeasureFactors.set(trait, factors);
  }
  return factors;
}

/** A column of unknown cells per matrix, shared by every ranking (it is only ever read). */
const unknownColumns = new WeakMap<CompiledMatrix, Uint16Array>();

export function unknownColumnOf(compiled: CompiledMatrix): Uint16Array {
  let column = unknownColumns.get(compiled);
  if (!column) {
    column = new Uint16Array(compiled.taxonCount);
    unknownColumns.set(compiled, column);
  }
  return column;
}

/** The code columns of one pass (read once per pass, not per taxon). */
