/**
 * Sylvasift identification engine: the public surface. Pure TypeScript, no I/O; runs in Node and
 * in the browser. Import it as `@shared/engine`.
 *
 * Invariant: only what is exported here is supported; everything else in this folder may change.
 */
export type * from './types';
export type { CompiledMatrix, CompiledTrait, TaxonInfo } from './compiled';
export type { RankOptions, SuggestOptions } from './defaults';

export { MODEL, RANK_DEFAULTS, SUGGEST_DEFAULTS } from './defaults';
export { EngineUsageError, MatrixValidationError, ObservationError } from './errors';
export { assertValidMatrix, validateMatrix } from './validate';
export { validateObservations } from './observations';
export { compileMatrix } from './compile';
export { decodeBundle, encodeBundle } from './bundle';
export { cellOf, taxonIndex, traitByCode } from './lookup';
export { rank } from './rank';
export { suggest } from './suggest';
export { entropy } from './entropy';
export { inSentence } from './texts';
export { compare, diagnose, health } from './analysis';
export { buildKey, keyToLines } from './key';
export { generateSyntheticMatrix, type SyntheticOptions } from './synthetic';
export { CENTIMETRES_PER_INCH, convertLength, fromCentimetres, isLengthUnit, LENGTH_UNITS, MILLIMETRES_PER_CENTIMETRE, toCentimetres } from './units';
