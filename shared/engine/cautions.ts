/**
 * The cautions the product shows wherever identification could lead someone into harm: on species
 * pages (and the API's species look-up), sifts, study sets, drills, study sheets and the footer.
 *
 * Invariant: one wording per caution, shown the same by the API and the web app; each defers to
 * local rules and qualified people rather than advising.
 */
export const CAUTIONS = Object.freeze({
  /** eating or using plant parts */
  use: 'An identification is not advice on eating or using any plant part: several common trees and their look-alikes have toxic bark, leaves or seeds.',
  /** a ranked result is not a determination */
  identification:
    'A ranked shortlist is a suggestion, not a determination. Rare or protected species and decisions about hazard trees need a qualified botanist, forester or certified arborist.',
  /** the usual hazards of woods work (common practice, no source) */
  fieldSafety:
    'Check yourself for ticks after fieldwork; watch for venomous snakes, stinging insects, thorns and poison ivy climbing trunks; carry water in the heat; follow local rules on access and collecting.',
} as const);

/** The cautions every species page carries, whatever the taxon, in the order they are shown. */
export const GENERAL_CAUTIONS: readonly string[] = Object.freeze([CAUTIONS.use, CAUTIONS.identification, CAUTIONS.fieldSafety]);
