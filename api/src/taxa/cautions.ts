/** Cautions shown with every species page, whatever the taxon. */
export const GENERAL_CAUTIONS: readonly string[] = Object.freeze([
  'An identification here is not advice on eating, brewing or otherwise using any part of a plant: several common trees and their look-alikes have toxic bark, leaves or seeds.',
  'A ranked result is a suggestion, not a determination. Rare or protected species, and decisions about hazard trees, need a qualified botanist, forester or arborist and your local rules.',
  'In the field, watch for ticks, venomous snakes, stinging insects, thorns, heat and poison ivy climbing trunks.',
]);
