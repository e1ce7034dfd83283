/**
 * Matrix document and engine result types.
 *
 * Invariant: a MatrixDocument is plain JSON (no classes, no Dates) so the same shape is stored in
 * seeds/, sent over the API and read by the browser. Trait and value codes are kebab-case and the
 * core ones come verbatim from the trait glossary.
 */

/** How a trait is recorded. */
export type TraitKind = 'state' | 'numeric' | 'count';

/** When a trait can be observed. `leaf-off` traits are also visible in leaf. */
export type Season = 'any' | 'leaf-on' | 'leaf-off';

/** The season a sift is made in: in leaf or leafless. */
export type ObservingSeason = 'leaf-on' | 'leaf-off';

/** How often a taxon shows a coded value. */
export type Frequency = 'usual' | 'occasional' | 'rare';

/** Length units accepted in numeric observations. Matrix ranges are always in the trait's unit (cm). */
export type LengthUnit = 'cm' | 'mm' | 'in';

/** The plant part a trait belongs to; the client groups traits by it. */
export type PlantPart = 'leaf' | 'needle' | 'cone' | 'fruit' | 'flower' | 'twig' | 'bark' | 'form';

export interface TraitValue {
  /** kebab-case code, stable across editions */
  code: string;
  label: string;
  /** one-sentence glossary definition */
  definition?: string;
  /** path of the value's drawing relative to the illustrations root, e.g. `leaf-margin/serrate.svg` */
  illustration?: string;
  /** words a person might type to find this value ("three needles", "peeling") */
  synonyms?: string[];
}

export interface Trait {
  code: string;
  label: string;
  part: PlantPart;
  kind: TraitKind;
  /** unit of numeric ranges in the matrix; numeric traits only */
  unit?: 'cm';
  season: Season;
  /** observation effort, 1 = seen at a glance … 5 = needs a lens, a cut or a measurement; divides information gain */
  ease: number;
  /** probability that an observer reports a wrong value for this trait, in [0, 0.5) */
  errorRate: number;
  help?: string;
  /**
   * state traits: the possible values. count traits may also list labelled counts for chips and
   * drawings; there `code` is the count as a decimal string (`"3"`).
   */
  values?: TraitValue[];
  /** count traits: smallest and largest count an observer may report */
  countRange?: { min: number; max: number };
  /** the trait only makes sense when each named trait has one of the listed values */
  appliesWhen?: Record<string, string[]>;
}

/** A set of coded values (state codes or counts), grouped by how often the taxon shows them. */
export interface DiscreteCell {
  usual?: Array<string | number>;
  occasional?: Array<string | number>;
  rare?: Array<string | number>;
}

/** A numeric range in the trait's unit: min ≤ low ≤ high ≤ max (typical range inside extreme range). */
export interface NumericCell {
  min: number;
  low: number;
  high: number;
  max: number;
}

/** `unknown`: not coded yet (never counts against a taxon). `inapplicable`: the trait does not exist on this taxon. */
export type Cell = DiscreteCell | NumericCell | 'unknown' | 'inapplicable';

export interface Taxon {
  /** stable slug, e.g. `pinus-taeda` */
  id: string;
  scientificName: string;
  authority: string;
  family: string;
  commonNames: string[];
  status?: 'native' | 'naturalised' | 'introduced';
  /** relative commonness in the edition's region; > 0, default 1 */
  prior?: number;
  /** trait code → cell; a trait missing here is `unknown` */
  cells: Record<string, Cell>;
  /** where the coding came from: a named handbook or flora, or `from memory` */
  source?: string;
  habitat?: string;
  range?: string;
  /** plain-language cautions (toxic parts, thorns, skin irritants) */
  cautions?: string[];
  /** ids of taxa commonly confused with this one */
  lookAlikes?: string[];
  photos?: Array<{ url: string; caption?: string; credit?: string }>;
}

/** A pair of taxa that no trait of the matrix separates, recorded with the reason. */
export interface InseparablePair {
  taxa: [string, string];
  reason: string;
}

export interface MatrixDocument {
  format: 'sylvasift-matrix';
  version: 1;
  title: string;
  region?: string;
  traits: Trait[];
  taxa: Taxon[];
  inseparable?: InseparablePair[];
}

/**
 * What an observer reports. Several values mean "one of these" (the observer is unsure).
 * Numeric observations carry a single value and its unit (default: the trait's unit).
 */
export type Observation = { trait: string; values: Array<string | number> } | { trait: string; value: number; unit?: LengthUnit };

/** How one observed trait bears on one candidate. */
export type ReasonStatus = 'matched' | 'partial' | 'conflict' | 'not-coded' | 'not-applicable';

export interface Reason {
  trait: string;
  status: ReasonStatus;
  /** P(observation | taxon) used in the score, in (0, 1] */
  likelihood: number;
  /** one plain-language sentence the UI can show as is */
  text: string;
}

export interface Candidate {
  taxonId: string;
  /** posterior probability over all taxa, in [0, 1]; all candidates plus ruled-out sum to 1 */
  probability: number;
  /** number of observed traits that conflict with the coding */
  conflicts: number;
  reasons: Reason[];
}

export interface RankResult {
  candidates: Candidate[];
  /** taxa with more conflicts than the leeway allows, best first */
  ruledOut: Candidate[];
}

export interface SuggestionPreview {
  /** the answer (a value code, a count, or a numeric band label like `< 8 cm`) */
  answer: string | number;
  label: string;
  /** probability the observer gives this answer under the current posterior */
  probability: number;
  /** ids of the shortlisted species coded with this answer, most probable first (at most 3) */
  leaders: string[];
  /** how many of the species holding most (95%) of the probability are coded with this answer */
  remaining: number;
}

export interface Suggestion {
  trait: string;
  label: string;
  /** expected reduction of posterior entropy in bits */
  expectedGain: number;
  /** expectedGain × the chance the trait can be seen now (× 1 − its error rate, for a first question), divided by the trait's ease */
  score: number;
  preview: SuggestionPreview[];
}

/* ------------------------------------------------------------------------------------------------
 * Additions for the engine's validation, comparison, health and key results. Everything above this
 * line is the shared contract and stays as it is.
 * ---------------------------------------------------------------------------------------------- */

/** How serious a matrix problem is: an `error` stops compilation, a `warning` is repaired or reported. */
export type ProblemSeverity = 'error' | 'warning';

/** One thing wrong with a matrix document, precise enough to point a curator at the cell. */
export interface MatrixProblem {
  severity: ProblemSeverity;
  /** stable machine code, e.g. `unknown-value-in-cell` */
  code: string;
  /** JSON-path-like location, e.g. `taxa[3].cells.needle-length` */
  path: string;
  taxon?: string;
  trait?: string;
  /** one plain sentence naming the taxon, the trait and what is wrong */
  message: string;
}

/** Which part of an observation is wrong. */
export type ObservationField = 'observation' | 'trait' | 'values' | 'value' | 'unit';

/** One thing wrong with one observation; `index` is its position in the submitted list. */
export interface ObservationProblem {
  index: number;
  field: ObservationField;
  /** stable machine code, e.g. `unknown-value` */
  code: string;
  message: string;
}

/** An observation the ranking set aside, with the reason shown to the user. */
export interface SkippedObservation {
  trait: string;
  reason: string;
}

/** How one trait relates a set of taxa in a side-by-side comparison. */
export type ComparisonVerdict = 'separates' | 'overlaps' | 'same' | 'not-coded';

/**
 * How firmly a trait tells two taxa apart. `reliable`: what either usually shows never turns up in
 * the other (no usual value of one is coded for the other at any frequency; no typical range reaches
 * into the other's extreme range), or the trait applies to only one of them. `usual`: the usual value
 * sets (typical ranges) are disjoint, but an occasional or rare value (an extreme length) is shared.
 */
export type SeparationStrength = 'reliable' | 'usual';

export interface TraitComparison {
  trait: string;
  label: string;
  verdict: ComparisonVerdict;
  /**
   * with verdict `separates` only: `reliable` when every pair of the set is separated reliably,
   * `usual` when at least one pair is separated only by its usual values or typical ranges
   */
  strength?: SeparationStrength;
  /** taxon id → the coded cell, for display */
  cells: Record<string, Cell>;
  /** one plain sentence */
  text: string;
}

export interface ComparisonResult {
  taxa: string[];
  /**
   * every pair of the set is separated on these traits, at least by its usual values or typical
   * ranges; the reliable ones first, then the usual ones, each group in matrix order
   */
  separating: TraitComparison[];
  /** some codings differ but at least one pair overlaps */
  overlapping: TraitComparison[];
  /** coded identically for every taxon of the set */
  same: TraitComparison[];
  /** at least one taxon of the set has no coding */
  notCoded: TraitComparison[];
}

/** One taxon a diagnostic trait tells apart from the diagnosed one, and how firmly. */
export interface DiagnosticSeparation {
  taxonId: string;
  strength: SeparationStrength;
}

export interface DiagnosticTrait {
  trait: string;
  label: string;
  /** ids of the other taxa this trait tells apart from the diagnosed one (not already set apart by an earlier trait) */
  separates: string[];
  text: string;
  /** the taxa of `separates`, in the same order, each with how firmly this trait separates it */
  separations: DiagnosticSeparation[];
  /** `reliable` when every separation of this trait is reliable, otherwise `usual` */
  strength: SeparationStrength;
}

export interface DiagnosisResult {
  taxonId: string;
  /** a small set of traits that together separate the taxon from the others, in the order chosen */
  traits: DiagnosticTrait[];
  /** taxa of the set that no trait separates from the diagnosed one, not even by usual values or typical ranges */
  unseparated: string[];
}

export interface HealthReport {
  /**
   * pairs of taxa that no trait separates, not even by usual values or typical ranges; `known` when
   * the document records the pair as inseparable
   */
  inseparablePairs: Array<{ taxa: [string, string]; known: boolean; reason?: string }>;
  /**
   * pairs that no trait separates reliably but some separate by their usual values or typical ranges
   * only (an occasional or rare value, or an extreme length, is shared); `traits` are those traits,
   * in matrix order. A softer warning: coding one firm difference would make the pair reliable.
   */
  weaklySeparated: Array<{ taxa: [string, string]; traits: string[] }>;
  /** unknown cells, per taxon */
  emptyCells: Array<{ taxon: string; traits: string[] }>;
  /** share of cells that are unknown, in [0, 1] */
  emptyShare: number;
  /** traits that separate no two taxa, not even by their usual values or typical ranges */
  traitsSeparatingNothing: string[];
  /** numeric cells whose min ≤ low ≤ high ≤ max order was broken in the document (compiled sorted) */
  rangesOutOfOrder: Array<{ taxon: string; trait: string; cell: NumericCell }>;
  /** taxa coded for a trait while coded outside that trait's appliesWhen condition */
  appliesWhenViolations: Array<{ taxon: string; trait: string; condition: string }>;
  /** every warning found at compile time */
  warnings: MatrixProblem[];
}

/** One lead of a couplet: a description and where it goes. */
export interface KeyLead {
  /** the lead's wording, e.g. `Needles in bundles of 3` */
  text: string;
  trait: string;
  /** value codes or counts this lead covers; for numeric leads, the band in cm */
  values?: Array<string | number>;
  range?: { from?: number; to?: number };
  /** the next couplet, or the end of the key */
  next: KeyNode;
}

export interface KeyCouplet {
  kind: 'couplet';
  /** 1-based number, depth-first, for printing `1a`/`1b` and `go to 4` */
  number: number;
  trait: string;
  leads: [KeyLead, KeyLead];
}

export interface KeyEnd {
  kind: 'taxa';
  /** one id when the key reaches a single taxon; several when nothing left splits them */
  taxa: string[];
}

export type KeyNode = KeyCouplet | KeyEnd;

export interface DichotomousKey {
  taxa: string[];
  root: KeyNode;
  /** number of couplets */
  couplets: number;
}

/** Declaration merging: optional fields added to the shared result types above. */
export interface RankResult {
  /** observations set aside because other observations contradict their appliesWhen condition */
  skipped?: SkippedObservation[];
  /** how many taxa are within leeway in total (candidates may be cut by the limit) */
  totalCandidates?: number;
  /** how many taxa exceed the leeway in total */
  totalRuledOut?: number;
}

export interface Suggestion {
  /**
   * expected effort (sum of the traits' ease) to reach a confident leader when this trait is asked
   * first and the best-scoring trait after each answer; the number of questions when every ease is 1.
   * Present only when the shortlist was small enough to look ahead, and then the list is sorted by it.
   */
  expectedEffort?: number;
  /**
   * why the trait stands where it does: its expected gain and ease, whether it is always at hand or
   * how likely it is to be seen now, and for a first question how often it is misread
   */
  reason: string;
}
