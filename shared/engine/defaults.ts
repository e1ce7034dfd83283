/**
 * The engine's tunable constants and the defaults of every option, frozen so no caller can change
 * them for everyone else.
 *
 * Invariant: these are the only numbers the scoring model depends on besides the matrix itself.
 */
import type { InHand } from './in-hand';

/** Scoring-model constants, fixed per engine version (changing them changes rankings). */
export const MODEL = Object.freeze({
  /** relative weight of a value coded `usual` when the observer's true value is drawn from a cell */
  usualWeight: 1,
  /** relative weight of a value coded `occasional` */
  occasionalWeight: 0.25,
  /** relative weight of a value coded `rare` */
  rareWeight: 0.05,
  /** error rates below this are raised to it, so one wrong answer never multiplies by zero */
  minErrorRate: 0.001,
  /** error rates are capped just below one half: above it an answer would carry negative evidence */
  maxErrorRate: 0.49,
  /** score of a measurement inside the typical range (low–high) */
  typicalScore: 1,
  /** score of a measurement between the typical range and the recorded extremes */
  extremeScore: 0.3,
  /** score of a measurement on a taxon whose range is not coded: as if it fell in the extremes */
  unknownNumericScore: 0.3,
  /** share of a taxon's measurements assumed inside the typical range (used to preview numeric bands) */
  typicalShare: 0.8,
  /** number of bands a numeric trait is cut into for suggestions */
  numericBands: 4,
  /** a prior weight at or below zero (or not finite) is replaced by this, so it stays comparable */
  minPrior: 1e-9,
});

export interface RankOptions {
  /** the sift's season; ranking scores every valid observation whatever the season, so this is informational */
  season?: 'leaf-on' | 'leaf-off';
  /** most conflicts a taxon may have and still be on the Shortlist; more puts it under Ruled out */
  leeway?: number;
  /** most candidates (and, separately, most ruled-out taxa) returned; probabilities still cover all taxa */
  limit?: number;
  /** taxon id → prior weight (> 0), replacing the taxon's own prior for this call */
  priors?: Record<string, number>;
}

export const RANK_DEFAULTS = Object.freeze({
  season: 'leaf-on' as const,
  leeway: 2,
  limit: 20,
});

export interface SuggestOptions {
  /** the sift's season: `leaf-on` traits are left out in `leaf-off` */
  season?: 'leaf-on' | 'leaf-off';
  /** most suggestions returned */
  limit?: number;
  /** accepted and checked for symmetry with rank; previews count the species holding most of the probability instead */
  leeway?: number;
  /** taxon id → prior weight (> 0), replacing the taxon's own prior for this call */
  priors?: Record<string, number>;
  /** trait codes already asked but not answered (the observer could not see them); left out */
  exclude?: string[];
  /** look one step ahead when at most this many taxa carry real probability; 0 turns lookahead off */
  lookaheadMaxCandidates?: number;
  /** the leader probability at which a sift counts as settled, for lookahead costs */
  confidentAt?: number;
  /** what the observer has in hand: traits of parts it does not show are never suggested */
  inHand?: InHand;
  /** the month of the sift (1–12): seasonal parts (flowers, fruit, autumn colour) are less likely to be seen outside theirs */
  month?: number;
  /**
   * count every trait of a part in hand as seen for sure, whatever the month (no chance for flowers,
   * fruit or cones to be missing): for simulations whose observers answer every question
   */
  assumeSeen?: boolean;
}

export const SUGGEST_DEFAULTS = Object.freeze({
  season: 'leaf-on' as const,
  limit: 5,
  leeway: 2,
  lookaheadMaxCandidates: 16,
  confidentAt: 0.95,
  inHand: 'standing-tree' as InHand,
  /** traits expected to gain less than this many bits are treated as unable to split the shortlist */
  minGainBits: 1e-4,
  /** the shortlist a trait must split: taxa at least this share of the leader's probability */
  shortlistShare: 0.01,
  /** taxa with less than this posterior probability are ignored while computing suggestions */
  negligibleProbability: 1e-9,
});
