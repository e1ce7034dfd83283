import type { Models } from '../db/models';
import type { EditionCatalog } from '../editions/edition-catalog';
import { problems } from '../http/problem';
import { listPhotos } from '../uploads/photo-store';
import { photoView, type PhotoView } from '../uploads/photo-urls';
import { GENERAL_CAUTIONS } from './cautions';
import { searchTaxa } from './taxon-search';
import { codedTraits, taxonReference, taxonSummary, type CodedTrait, type TaxonSummary } from './taxon-views';

export interface LookupDeps {
  editions: EditionCatalog;
  models: Models;
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
  photos: PhotoView[];
  cautions: string[];
  generalCautions: readonly string[];
}

/** Finds published taxa by name, one page at a time. */
export async function findPublishedTaxa(deps: LookupDeps, query: string, page: number, pageSize: number): Promise<TaxonPage> {
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
export async function describePublishedTaxon(deps: LookupDeps, id: string): Promise<TaxonDetail> {
  const edition = await deps.editions.current();
  const taxon = edition.taxaById.get(id);
  if (!taxon) throw problems.notFound(`There is no taxon "${id}" in edition ${edition.number}.`);

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
    photos: photos.map(photoView),
    cautions: taxon.cautions ?? [],
    generalCautions: GENERAL_CAUTIONS,
  };
}
