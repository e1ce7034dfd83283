/**
 * The compiled matrix: what rank, suggest and the analysis functions read.
 *
 * Invariant: for trait j and taxon t, `cellPattern[j * taxonCount + t]` is the id of the coding the
 * scorer uses for that cell — 0 unknown, 1 inapplicable, 2 and up a distinct coded value set of
 * trait j (numeric traits use 2 for "range coded") — and every per-pattern table of trait j is
 * indexed by that id. Value sets are bitmasks; numeric ranges are in centimetres, sorted.
 */
import type { InseparablePair, MatrixProblem, NumericCell, PlantPart, Season, Taxon, TraitKind, TraitValue } from './types';

export const UNKNOWN_PATTERN = 0;
export const INAPPLICABLE_PATTERN = 1;
export const CODED_RANGE_PATTERN = 2;

/** How a value stands in a pattern (the per-(pattern, value) table `valueStatus`). */
export const ValueStatus = Object.freeze({
  Usual: 0,
  Occasional: 1,
  Rare: 2,
  NotCoded: 3,
  Unknown: 4,
  Inapplicable: 5,
} as const);

/** Offsets of the four range fields inside a numeric trait's block of `ranges`. */
export const RangeField = Object.freeze({ Min: 0, Low: 1, High: 2, Max: 3 } as const);

/** A taxon's descriptive fields, everything but the cells. */
export type TaxonInfo = Omit<Taxon, 'cells'>;

/** One appliesWhen condition resolved to indexes: the trait must show one of `allowed` (value indexes). */
export interface CompiledCondition {
  trait: number;
  allowed: number[];
}

export interface CompiledTrait {
  index: number;
  code: string;
  label: string;
  part: PlantPart;
  kind: TraitKind;
  unit?: 'cm';
  season: Season;
  ease: number;
  /** the error rate as coded */
  codedErrorRate: number;
  /** the error rate the scorer uses, clamped into [MODEL.minErrorRate, MODEL.maxErrorRate] */
  errorRate: number;
  help?: string;
  /** values as listed in the document (state: all values; count: the labelled counts, maybe none) */
  values: TraitValue[];
  /** answer index → code: the value code (state) or the count (count); empty for numeric */
  answerCodes: Array<string | number>;
  /** answer index → label shown to people */
  answerLabels: string[];
  /** answers a discrete trait has (state values or counts); 0 for numeric */
  answerCount: number;
  /** count traits: the count of answer 0 */
  countMin: number;
  /** 32-bit words per value mask */
  words: number;
  appliesWhen?: Record<string, string[]>;
  conditions: CompiledCondition[];
  /** distinct patterns of this trait (including the unknown and inapplicable ones) */
  patternCount: number;
  /** where this trait's masks start in `masks`: pattern p at maskBase + p * 3 * words (usual, occasional, rare) */
  maskBase: number;
  /** where this trait's tables start in `likelihood`, `logLikelihood`, `valueStatus`: (p, v) at likBase + p * answerCount + v */
  likBase: number;
  /** numeric traits: block index in `ranges`; -1 otherwise */
  numericIndex: number;
  /** numeric traits: cut points (cm) splitting the coded ranges into bands for suggestions */
  bandCuts: number[];
}

export interface CompiledMatrix {
  format: 'sylvasift-compiled';
  version: 1;
  title: string;
  region?: string;
  taxa: TaxonInfo[];
  traits: CompiledTrait[];
  taxonCount: number;
  /** prior weight per taxon as coded (> 0, default 1) */
  priorWeight: Float64Array;
  /** traits × taxa, column-major: effective pattern id of each cell */
  cellPattern: Uint16Array;
  /** pattern value masks, three per pattern (usual, occasional, rare) */
  masks: Uint32Array;
  /** P(observer reports value v | the taxon's coding is pattern p) */
  likelihood: Float64Array;
  /** natural log of `likelihood` */
  logLikelihood: Float64Array;
  /** ValueStatus of value v in pattern p */
  valueStatus: Uint8Array;
  /** numeric traits × 4 fields × taxa: min, low, high, max in cm, always in order (compile sorts a range given out of order) */
  ranges: Float64Array;
  /** cells (j * taxonCount + t, ascending) whose coded pattern differs from the effective one */
  overrideKeys: Uint32Array;
  /** the coded pattern of each overridden cell */
  overrideCoded: Uint16Array;
  rangesOutOfOrder: Array<{ taxon: string; trait: string; cell: NumericCell }>;
  warnings: MatrixProblem[];
  inseparable: InseparablePair[];
  /** lookups rebuilt on decode, never serialised */
  taxonIndexById: Map<string, number>;
  traitIndexByCode: Map<string, number>;
}

export function maskHas(masks: Uint32Array, offset: number, value: number): boolean {
  return (masks[offset + (value >>> 5)] & (1 << (value & 31))) !== 0;
}
