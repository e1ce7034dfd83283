/** The cautions the product shows wherever identification could lead someone into harm. */
export const FIELD_SAFETY_CAUTION =
  'Check yourself for ticks after fieldwork; watch for venomous snakes, stinging insects, thorns and poison ivy climbing trunks; carry water in the heat; follow local rules on access and collecting.';

export const IDENTIFICATION_CAUTION =
  'A ranked shortlist is a suggestion, not a determination. Rare or protected species and decisions about hazard trees need a qualified botanist, forester or certified arborist.';

export const USE_CAUTION =
  'An identification is not advice on eating or using any plant part: several common trees and their look-alikes have toxic bark, leaves or seeds.';
