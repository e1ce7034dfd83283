import Fuse from 'fuse.js';
import type { TaxonMatch } from '../../core/api/study-service';

/**
 * A best match is clear when it is close to the words and well ahead of the next one (fuse.js
 * scores: 0 is exact, 1 is nothing alike), or when one species alone bears the name typed. Each name
 * of a species is scored on its own and the species takes its best, so a species with many names
 * gains nothing from them. Thresholds are common practice, no source: one typo in a two-word name
 * scores about 0.1 here, while two names that merely share a word ("… maple") lie within 0.1 of
 * each other.
 */
const CLEAR_BEST_SCORE = 0.4;
const CLEAR_BEST_GAP = 0.15;

/** The server's matches, ranked again by how close each one's nearest name is to the words, and whether the first is a clear winner. */
export function rankMatches(words: string, matches: readonly TaxonMatch[]): { matches: TaxonMatch[]; clearBest: boolean } {
  if (matches.length === 0) return { matches: [], clearBest: false };
  const names = matches.flatMap((match, index) => [...match.commonNames, match.scientificName].map((name) => ({ index, name })));
  // Matches near the start of a name count most: "sugar maple" is closer to "sugr maple" than "southern sugar maple" is.
  const fuse = new Fuse(names, { keys: ['name'], includeScore: true, ignoreFieldNorm: true, threshold: 1, distance: 20 });
  const best = new Map<number, number>();
  for (const result of fuse.search(words)) if (!best.has(result.item.index)) best.set(result.item.index, result.score ?? 1);
  const ranked = matches.map((match, index) => ({ match, index, score: best.get(index) ?? 1 })).sort((a, b) => a.score - b.score || a.index - b.index);
  const typed = words.trim().toLowerCase();
  const exact = new Set(names.filter((entry) => entry.name.toLowerCase() === typed).map((entry) => entry.index));
  const [first, next] = ranked;
  const clearBest =
    first !== undefined &&
    (exact.size > 0
      ? exact.size === 1 && exact.has(first.index)
      : first.score <= CLEAR_BEST_SCORE && (next === undefined || next.score - first.score >= CLEAR_BEST_GAP));
  return { matches: ranked.map((entry) => entry.match), clearBest };
}
