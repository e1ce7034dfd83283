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

/** How many "did you mean" taxa an unknown id gets. */
export const MOST_CLOSE_TAXA = 3;

/**
 * The taxa an unknown id most likely meant, best first: the id is read as words
 * (`pinus-tada` → "pinus tada"), so a typo in the scientific name, a common name or the id itself
 * all find their taxon.
 */
export function closeTaxa(taxa: readonly Taxon[], unknownId: string, most = MOST_CLOSE_TAXA): Taxon[] {
  const words = unknownId.replace(/[-_]+/g, ' ').trim();
  if (words.length < 2) return [];
  return indexFor(taxa)
    .search(words)
    .slice(0, most)
    .map((hit) => hit.item);
}

/** "Did you mean …?" in words, or '' when nothing is close. */
export function didYouMean(close: readonly Taxon[]): string {
  if (close.length === 0) return '';
  const named = close.map((taxon) => `${taxon.id} (${[taxon.scientificName, taxon.commonNames[0]].filter(Boolean).join(', ')})`);
  return ` Did you mean ${named.length === 1 ? named[0] : `${named.slice(0, -1).join(', ')} or ${named.at(-1)}`}?`;
}
