/**
 * Sylvasift identification engine: the public surface. Pure TypeScript, no I/O; runs in Node and
 * in the browser. Import it as `@shared/engine`, never a file inside this folder.
 *
 * Invariant: only what is exported here is supported; everything else in this folder may change.
 */

// ── Types: the matrix document, observations and every result ──────────────────────────────────
export type * from './types';
export type { CompiledMatrix, CompiledTrait, TaxonInfo } from './compiled-matrix';
export type { RankOptions, SuggestOptions } from './defaults';
export type { PreparedObservation } from './observations';
export type { LabelledTrait } from './words';

// ── Defaults and errors ─────────────────────────────────────────────────────────────────────────
export { MODEL, RANK_DEFAULTS, SUGGEST_DEFAULTS } from './defaults';
export { EngineUsageError, MatrixValidationError, ObservationError } from './errors';

// ── The matrix: validate, compile, ship as a bundle, look up ────────────────────────────────────
export { assertValidMatrix, validateMatrix } from './validate';
export { compileMatrix } from './compile';
export { decodeBundle, encodeBundle } from './bundle';
export { cellOf, taxonIndex, traitByCode } from './lookup';
/** The compiled layout (pattern ids, value statuses, range fields), for tools that read a CompiledMatrix's arrays. */
export { CODED_RANGE_PATTERN, INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, ValueStatus } from './compiled-matrix';

// ── Identification: observations, rank, suggest, compare, keys ──────────────────────────────────
export { prepareObservations, validateObservations } from './observations';
export { rank } from './rank';
export { suggest } from './suggest';
export { entropy } from './entropy';
export { compare, diagnose, health } from './analysis';
export { buildKey, keyToLines } from './key';

// ── The domain's words and rules, one home for the engine, the API and the web app ──────────────
/** Closed vocabularies (plant parts and their headings, kinds, seasons, frequencies) and which traits a season shows. */
export { FREQUENCIES, OBSERVING_SEASONS, PART_LABELS, PLANT_PARTS, SEASONS, TRAIT_KINDS, visibleInSeason } from './vocabulary';
/** What is in hand (which plant parts a specimen shows) and the chance a trait can be seen this month. */
export { IN_HAND, IN_HAND_LABELS, IN_HAND_PARTS, isInHand, seeingChance, traitInHand, type InHand, type SeeingChance } from './in-hand';
/** Telling a cell's four shapes apart. */
export { isDiscreteCell, isInapplicableCell, isNumericCell, isUnknownCell } from './cells';
/** A cell in words: the sentence form (reasons, the API) and the table form (pages and sheets). */
export { cellInBrief, cellInWords, NOT_APPLICABLE_WORDS, NOT_CODED_WORDS } from './cell-words';
/** Numbers, lists, value labels and species names. */
export { answerLabel, commonName, formatLength, formatNumber, inSentence, joinAnd, joinOr, valueLabel } from './words';
/** The cautions shown wherever identification could lead someone into harm. */
export { CAUTIONS, GENERAL_CAUTIONS } from './cautions';
/** Lengths of the free-text fields, shared by the contract, the routes and the forms. */
export { FIELD_LIMITS } from './field-limits';
/** Units of length. */
export { CENTIMETRES_PER_INCH, convertLength, fromCentimetres, isLengthUnit, LENGTH_UNITS, MILLIMETRES_PER_CENTIMETRE, toCentimetres } from './units';

// ── Test data: synthetic matrices and a seeded generator ────────────────────────────────────────
export { seededRandom, shuffled } from './random';
export { generateSyntheticMatrix, type SyntheticOptions } from './synthetic';
