import { cellInWords, compare, diagnose, GENERAL_CAUTIONS, type SeparationStrength, type Taxon } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from '../editions/edition-models';
import type { PhotoModels } from '../uploads/photo-models';
import type { EditionCatalog, LoadedEdition } from '../editions/edition-catalog';
import { problems } from '../http/problem';
import { listPhotos } from '../uploads/photo-store';
import { photoView, type PhotoView } from '../uploads/photo-urls';
import { closeTaxa, didYouMean, searchTaxa } from './taxon-search';
import { codedTraits, taxonReference, taxonSummary, type CodedTrait, type TaxonSummary } from './taxon-views';

export interface LookupDeps {
  editions: EditionCatalog;
  models: MatrixModels & EditionModels & PhotoModels;
}

export interface TaxonPage {
  edition: { id: number; publishedAt: string };
  query: string;
  page: number;
  pageSize: number;
  total: number;
  items: TaxonSummary[];
}

export interface TaxonDetail {
  edition: { id: number; publishedAt: string };
  taxon: TaxonSummary & {
    prior: number;
    habitat: string | null;
    range: string | null;
    source: string | null;
  };
  traits: CodedTrait[];
  lookAlikes: Array<{ id: string; scientificName: string; commonNames: string[] }>;
  /** the traits that tell this taxon from its look-alikes; null when it has none in the edition */
  diagnostic: Diagnostic | null;
  photos: PhotoView[];
  cautions: string[];
  generalCautions: readonly string[];
}

export interface Diagnostic {
  traits: Array<{
    trait: string;
    label: string;
    /** the look-alikes this trait sets the taxon apart from (those not already set apart by an earlier trait) */
    separates: string[];
    text: string;
    /** `reliable` when it sets every one of `separates` apart reliably; `usual` when some only by their usual values or typical ranges */
    strength: SeparationStrength;
    /** this taxon's coding, in words */
    coded: string;
    /** how each look-alike is coded on this trait, and whether the trait tells it apart */
    lookAlikes: Array<{ id: string; coded: string; separated: boolean; strength?: SeparationStrength }>;
  }>;
  /** look-alikes that no trait of the edition tells apart */
  unseparated: string[];
}

/** How a sentence names a taxon: its first common name with the scientific name, or the scientific name alone. */
function nameInText(taxon: Taxon): string {
  const common = taxon.commonNames[0];
  return common ? `${common} (${taxon.scientificName})` : taxon.scientificName;
}

/** The engine's sentence names taxa by id (`pinus-serotina`); people read names (`pond pine (Pinus serotina)`). */
function withNames(edition: LoadedEdition, text: string, ids: readonly string[]): string {
  // longest ids first, so an id that is the start of another never replaces part of it
  return [...ids]
    .sort((a, b) => b.length - a.length)
    .reduce((sentence, id) => {
      const taxon = edition.taxaById.get(id);
      return taxon ? sentence.replace(new RegExp(`(?<![\\w-])${id}(?![\\w-])`, 'g'), nameInText(taxon)) : sentence;
    }, text);
}

/** A small set of traits that tells the taxon from its look-alikes, each with how every look-alike differs. */
function diagnoseAmongLookAlikes(edition: LoadedEdition, taxonId: string, lookAlikeIds: string[]): Diagnostic | null {
  if (lookAlikeIds.length === 0) return null;
  const compiled = edition.compiled;
  const diagnosis = diagnose(compiled, taxonId, lookAlikeIds);
  // each look-alike side by side with the taxon: the cells as the engine weighs them, and which traits tell the pair apart
  const pairs = new Map(
    lookAlikeIds.map((id) => {
      const pair = compare(compiled, [taxonId, id]);
      const cells = new Map([...pair.separating, ...pair.overlapping, ...pair.same, ...pair.notCoded].map((entry) => [entry.trait, entry.cells]));
      return [id, { cells, separating: new Map(pair.separating.map((entry) => [entry.trait, entry.strength ?? 'reliable'])) }];
    }),
  );
  return {
    traits: diagnosis.traits.map((chosen) => {
      const trait = edition.traitsByCode.get(chosen.trait)!;
      // the taxon's own cell is in every pair; take it from the first
      const coded = (id: string) => cellInWords(trait, pairs.get(id === taxonId ? lookAlikeIds[0]! : id)?.cells.get(chosen.trait)?.[id] ?? 'unknown');
      return {
        trait: chosen.trait,
        label: chosen.label,
        separates: chosen.separates,
        text: withNames(edition, chosen.text, chosen.separates),
        strength: chosen.strength,
        coded: coded(taxonId),
        lookAlikes: lookAlikeIds.map((id) => {
          const strength = pairs.get(id)?.separating.get(chosen.trait);
          return { id, coded: coded(id), separated: strength !== undefined, ...(strength && { strength }) };
        }),
      };
    }),
    unseparated: diagnosis.unseparated,
  };
}

/** Finds published taxa by name, one page at a time. */
async function findPublishedTaxa(deps: LookupDeps, query: string, page: number, pageSize: number): Promise<TaxonPage> {
  const edition = await deps.editions.current();
  const matches = searchTaxa(edition.document.taxa, query);
  const start = (page - 1) * pageSize;
  return {
    edition: edition.reference,
    query,
    page,
    pageSize,
    total: matches.length,
    items: matches.slice(start, start + pageSize).map(taxonSummary),
  };
}

/** Everything a species page shows about one published taxon. */
async function describePublishedTaxon(deps: LookupDeps, id: string): Promise<TaxonDetail> {
  const edition = await deps.editions.current();
  const taxon = edition.taxaById.get(id);
  if (!taxon) {
    const close = closeTaxa(edition.document.taxa, id);
    throw problems.notFound(`There is no taxon "${id}" in edition ${edition.number}.${didYouMean(close)}`, { suggestions: close.map(taxonReference) });
  }

  const lookAlikes = (taxon.lookAlikes ?? []).flatMap((otherId) => {
    const other = edition.taxaById.get(otherId);
    return other ? [taxonReference(other)] : [];
  });
  const photos = await listPhotos(deps.models, taxon.id);
  return {
    edition: edition.reference,
    taxon: {
      ...taxonSummary(taxon),
      prior: taxon.prior ?? 1,
      habitat: taxon.habitat ?? null,
      range: taxon.range ?? null,
      source: taxon.source ?? null,
    },
    traits: codedTraits(taxon, edition.document.traits),
    lookAlikes,
    diagnostic: diagnoseAmongLookAlikes(
      edition,
      taxon.id,
      lookAlikes.map((other) => other.id),
    ),
    photos: photos.map(photoView),
    cautions: taxon.cautions ?? [],
    generalCautions: GENERAL_CAUTIONS,
  };
}

/** Species lookup in the current edition: search and one taxon in full. */
export function taxaService(deps: LookupDeps) {
  return {
    find: findPublishedTaxa.bind(null, deps),
    describe: describePublishedTaxon.bind(null, deps),
  };
}

export type TaxaService = ReturnType<typeof taxaService>;
