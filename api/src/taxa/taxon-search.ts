import Fuse from 'fuse.js';
import type { Taxon } from '@shared/engine';

/**
 * Fuzzy search over a published edition's scientific and common names.
 *
 * Invariant: one index per edition document, built on first use; an edition never changes.
 */
const indexes = new WeakMap<readonly Taxon[], Fuse<Taxon>>();

function indexFor(taxa: readonly Taxon[]): Fuse<Taxon> {
  let index = indexes.get(taxa);
  if (!index) {
    index = new Fuse([...taxa], {
      keys: [
        { name: 'scientificName', weight: 2 },
        { name: 'commonNames', weight: 2 },
        { name: 'family', weight: 0.5 },
        { name: 'id', weight: 0.5 },
      ],
      includeScore: true,
      ignoreLocation: true,
      threshold: 0.35,
      minMatchCharLength: 2,
    });
    indexes.set(taxa, index);
  }
  return index;
}

/** The taxa matching `query`, best match first; with no query, all taxa by scientific name. */
export function searchTaxa(taxa: readonly Taxon[], query: string): Taxon[] {
  const text = query.trim();
  if (text === '') return [...taxa].sort((a, b) => a.scientificName.localeCompare(b.scientificName));
  return indexFor(taxa)
    .search(text)
    .map((hit) => hit.item);
}
