import { cellInWords, compare, type Cell, type ComparisonVerdict, type SeparationStrength, type TraitComparison } from '@shared/engine';
import type { EditionCatalog, LoadedEdition } from '../editions/edition-catalog';
import { problems, type InvalidParam } from '../http/problem';
import { taxonReference } from '../taxa/taxon-views';
import { closeTaxa, didYouMean } from '../taxa/taxon-search';

export interface CompareRequest {
  taxa: string[];
}

export const COMPARE_LIMITS = Object.freeze({ fewest: 2, most: 4 });

/** One trait of a Side by side, with each taxon's coding in the order the caller named them. */
export interface ComparedTrait {
  trait: string;
  label: string;
  part: string;
  kind: string;
  verdict: ComparisonVerdict;
  /** with verdict `separates`: `reliable`, or `usual` when some pair is told apart only by its usual values or typical ranges */
  strength?: SeparationStrength;
  text: string;
  taxa: Array<{ id: string; cell: Cell; coded: string }>;
}

export interface Comparison {
  edition: { id: number; publishedAt: string };
  taxa: Array<{ id: string; scientificName: string; commonNames: string[] }>;
  /** every pair of the taxa is coded apart on these traits: the reliable ones first, then those apart only by usual values or typical ranges */
  separating: ComparedTrait[];
  /** coded differently for some, but at least one pair overlaps */
  overlapping: ComparedTrait[];
  /** coded alike for all of them */
  same: ComparedTrait[];
  /** at least one of them is not coded yet */
  notCoded: ComparedTrait[];
}

/** Each id must name a distinct taxon of the edition; every offending item is named. */
function assertComparable(edition: LoadedEdition, ids: readonly string[]): void {
  const invalid: InvalidParam[] = [];
  const seenAt = new Map<string, number>();
  ids.forEach((id, index) => {
    const earlier = seenAt.get(id);
    if (earlier !== undefined) invalid.push({ name: `/body/taxa/${index}`, reason: `"${id}" is already item ${earlier}; name each taxon once.` });
    else if (!edition.taxaById.has(id)) {
      const close = closeTaxa(edition.document.taxa, id);
      invalid.push({
        name: `/body/taxa/${index}`,
        reason: `There is no taxon "${id}" in edition ${edition.number}.${didYouMean(close)}`,
        suggestions: close.map(taxonReference),
      });
    }
    seenAt.set(id, earlier ?? index);
  });
  if (ids.length < COMPARE_LIMITS.fewest || ids.length > COMPARE_LIMITS.most) {
    invalid.push({ name: '/body/taxa', reason: `Name ${COMPARE_LIMITS.fewest} to ${COMPARE_LIMITS.most} taxa.` });
  }
  if (invalid.length > 0) throw problems.invalidInput(invalid[0]!.reason, invalid);
}

/** Side by side: the traits that tell the taxa apart, those that overlap, and those they share. */
async function compareTaxa(editions: EditionCatalog, request: CompareRequest): Promise<Comparison> {
  const edition = await editions.current();
  assertComparable(edition, request.taxa);
  const result = compare(edition.compiled, request.taxa);

  const describe = (entry: TraitComparison): ComparedTrait => {
    const trait = edition.traitsByCode.get(entry.trait)!;
    return {
      trait: entry.trait,
      label: entry.label,
      part: trait.part,
      kind: trait.kind,
      verdict: entry.verdict,
      ...(entry.strength && { strength: entry.strength }),
      text: entry.text,
      taxa: request.taxa.map((id) => {
        const cell = entry.cells[id] ?? 'unknown';
        return { id, cell, coded: cellInWords(trait, cell) };
      }),
    };
  };
  return {
    edition: edition.reference,
    taxa: request.taxa.map((id) => taxonReference(edition.taxaById.get(id)!)),
    separating: result.separating.map(describe),
    overlapping: result.overlapping.map(describe),
    same: result.same.map(describe),
    notCoded: result.notCoded.map(describe),
  };
}

/** Side by side in the current edition. */
export function compareService(editions: EditionCatalog) {
  return {
    compare: compareTaxa.bind(null, editions),
  };
}

export type CompareService = ReturnType<typeof compareService>;
