/**
 * The matrix's closed vocabularies, in the order people read them, with the labels the product shows.
 *
 * Invariant: each list holds every member of its type exactly once, so validation, generation and
 * display agree on what exists.
 */
import type { Frequency, ObservingSeason, PlantPart, Season, TraitKind } from './types';

/** The heading of each plant part's group of traits, in the order a page groups them: foliage first, the whole tree last. */
export const PART_LABELS: Readonly<Record<PlantPart, string>> = Object.freeze({
  leaf: 'Leaf',
  needle: 'Needle',
  cone: 'Cone',
  fruit: 'Fruit',
  flower: 'Flower',
  twig: 'Twig and bud',
  bark: 'Bark',
  form: 'Form',
});

/** Plant parts in the order a page groups traits (a Record names every part, so none is missing). */
export const PLANT_PARTS: readonly PlantPart[] = Object.freeze(Object.keys(PART_LABELS) as PlantPart[]);

export const TRAIT_KINDS: readonly TraitKind[] = Object.freeze(['state', 'numeric', 'count'] satisfies TraitKind[]);

/** When a trait can be seen, as coded on the trait. */
export const SEASONS: readonly Season[] = Object.freeze(['any', 'leaf-on', 'leaf-off'] satisfies Season[]);

/** The seasons a sift can be made in. */
export const OBSERVING_SEASONS: readonly ObservingSeason[] = Object.freeze(['leaf-on', 'leaf-off'] satisfies ObservingSeason[]);

/** How often a taxon shows a value, most often first. */
export const FREQUENCIES: readonly Frequency[] = Object.freeze(['usual', 'occasional', 'rare'] satisfies Frequency[]);

/**
 * Whether a trait can be seen in a sift's season: everything in leaf; leafless, all but the traits
 * coded `leaf-on` (a `leaf-off` trait such as a winter bud is also there in leaf).
 */
export function visibleInSeason(trait: { readonly season: Season }, season: ObservingSeason): boolean {
  return season === 'leaf-on' || trait.season !== 'leaf-on';
}
