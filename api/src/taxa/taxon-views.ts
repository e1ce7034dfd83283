import { FREQUENCIES, isDiscreteCell, isNumericCell, type Frequency, type NumericCell, type Taxon, type Trait } from '@shared/engine';

/** A taxon as lists show it. */
export interface TaxonSummary {
  id: string;
  scientificName: string;
  authority: string;
  family: string;
  commonNames: string[];
  status: Taxon['status'] | null;
}

export function taxonSummary(taxon: Taxon): TaxonSummary {
  return {
    id: taxon.id,
    scientificName: taxon.scientificName,
    authority: taxon.authority,
    family: taxon.family,
    commonNames: taxon.commonNames,
    status: taxon.status ?? null,
  };
}

/** The short reference identify, compare and look-alike lists use. */
export function taxonReference(taxon: Taxon): { id: string; scientificName: string; commonNames: string[] } {
  return { id: taxon.id, scientificName: taxon.scientificName, commonNames: taxon.commonNames };
}

export interface CodedValue {
  code: string;
  label: string;
  frequency: Frequency;
}

/** One coded cell of a taxon, labelled for people. */
export type CodedTrait =
  | { trait: string; label: string; part: string; kind: 'state' | 'count'; values: CodedValue[] }
  | { trait: string; label: string; part: string; kind: 'numeric'; unit: 'cm'; range: NumericCell };

/** The taxon's coded cells (neither unknown nor inapplicable), in the edition's trait order. */
export function codedTraits(taxon: Taxon, traits: readonly Trait[]): CodedTrait[] {
  const coded: CodedTrait[] = [];
  for (const trait of traits) {
    const cell = taxon.cells[trait.code];
    if (cell === undefined || typeof cell === 'string') continue;
    if (trait.kind === 'numeric' && isNumericCell(cell)) {
      coded.push({ trait: trait.code, label: trait.label, part: trait.part, kind: 'numeric', unit: 'cm', range: cell });
    } else if (trait.kind !== 'numeric' && isDiscreteCell(cell)) {
      const labels = new Map((trait.values ?? []).map((value) => [value.code, value.label]));
      const values = FREQUENCIES.flatMap((frequency) =>
        (cell[frequency] ?? []).map((value) => ({ code: String(value), label: labels.get(String(value)) ?? String(value), frequency })),
      );
      if (values.length > 0) coded.push({ trait: trait.code, label: trait.label, part: trait.part, kind: trait.kind, values });
    }
  }
  return coded;
}
