/**
 * What the observer has in hand and what can be seen this month: which plant parts a specimen
 * shows, and the chance a trait can be seen now, so Look at next asks only about what is there and
 * prefers what is always there.
 *
 * Invariant: a trait of a part the specimen does not show has seeing chance 0 and is never
 * suggested; every chance lies in [0, 1], and a trait of a part always at hand has chance 1.
 * Both tables are common practice of field identification, no source.
 */
import type { PlantPart, Season } from './types';

/** What the observer is looking at. */
export type InHand = 'standing-tree' | 'leafy-twig' | 'winter-twig' | 'bark-only' | 'cone-or-fruit' | 'fallen-leaf';

/**
 * The plant parts each kind of specimen shows (common practice, no source): a standing tree shows
 * everything; a twig cut in leaf its leaves or needles and the twig; a winter twig only the twig and
 * its buds; a trunk seen alone its bark and the tree's form; a cone or fruit picked up only itself; a
 * fallen leaf only the leaf or needle.
 */
export const IN_HAND_PARTS: Readonly<Record<InHand, readonly PlantPart[]>> = Object.freeze({
  'standing-tree': Object.freeze(['leaf', 'needle', 'cone', 'fruit', 'flower', 'twig', 'bark', 'form'] satisfies PlantPart[]),
  'leafy-twig': Object.freeze(['leaf', 'needle', 'twig'] satisfies PlantPart[]),
  'winter-twig': Object.freeze(['twig'] satisfies PlantPart[]),
  'bark-only': Object.freeze(['bark', 'form'] satisfies PlantPart[]),
  'cone-or-fruit': Object.freeze(['cone', 'fruit'] satisfies PlantPart[]),
  'fallen-leaf': Object.freeze(['leaf', 'needle'] satisfies PlantPart[]),
});

/** The kinds of specimen, standing tree first. */
export const IN_HAND: readonly InHand[] = Object.freeze(Object.keys(IN_HAND_PARTS) as InHand[]);

/** How each kind of specimen reads in a sentence. */
export const IN_HAND_LABELS: Readonly<Record<InHand, string>> = Object.freeze({
  'standing-tree': 'a standing tree',
  'leafy-twig': 'a twig in leaf',
  'winter-twig': 'a winter twig',
  'bark-only': 'the bark alone',
  'cone-or-fruit': 'a cone or fruit',
  'fallen-leaf': 'a fallen leaf',
});

export function isInHand(value: unknown): value is InHand {
  return typeof value === 'string' && Object.prototype.hasOwnProperty.call(IN_HAND_PARTS, value);
}

/** Whether a trait's part can be seen on what is in hand, with a sentence the UI can show. */
export function traitInHand(trait: { readonly part: PlantPart; readonly label?: string }, inHand: InHand): { inHand: boolean; reason: string } {
  const shows = IN_HAND_PARTS[inHand].includes(trait.part);
  const what = trait.label ?? trait.part;
  return shows
    ? { inHand: true, reason: `${what} can be seen on ${IN_HAND_LABELS[inHand]}.` }
    : { inHand: false, reason: `${what} cannot be seen on ${IN_HAND_LABELS[inHand]}: it is a ${trait.part} trait.` };
}

/**
 * When a seasonal part or trait can be seen, on a standing tree (common practice, no source; the
 * months are for the temperate northern hemisphere). `months` are the months it is there; `held` the
 * months some of it hangs on or lies beneath the tree; `present` the chance a given tree shows it
 * within sight at all in its months (not every tree flowers or bears fruit every year, males of some
 * species never bear fruit, and much of it is high in the crown); `held` and `outside` the seasonal
 * chance in the held months and the rest of the year.
 */
interface Availability {
  what: string;
  months: readonly number[];
  held: readonly number[];
  present: number;
  heldChance: number;
  outside: number;
}

const AVAILABILITY_BY_PART: Readonly<Partial<Record<PlantPart, Availability>>> = Object.freeze({
  // flowering is mostly in spring; a few species flower in summer, hence a small chance outside
  flower: { what: 'flowers', months: [3, 4, 5], held: [], present: 0.4, heldChance: 0, outside: 0.15 },
  // fruit ripens through summer and autumn; husks, nuts, pods and some berries hang on or lie beneath into winter
  fruit: { what: 'fruit', months: [6, 7, 8, 9, 10, 11], held: [12, 1, 2], present: 0.5, heldChance: 0.5, outside: 0.2 },
  // cones stay on the tree or beneath it all year (this year's, last year's or older ones)
  cone: { what: 'cones', months: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12], held: [], present: 0.6, heldChance: 0, outside: 0 },
});

/** Traits seen only for part of the year although their part is there longer. */
const AVAILABILITY_BY_TRAIT: Readonly<Record<string, Availability>> = Object.freeze({
  'fall-color': { what: 'autumn colour', months: [9, 10, 11], held: [], present: 1, heldChance: 0, outside: 0 },
  // male catkins form in late summer and hang through winter until they open in spring
  'winter-catkins': { what: 'winter catkins', months: [10, 11, 12, 1, 2, 3, 4], held: [], present: 0.5, heldChance: 0, outside: 0 },
});

/** The seasonal chance when the month is not given. */
const MONTH_UNKNOWN_CHANCE = 0.5;

const MONTH_NAMES = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

export function isMonth(value: unknown): value is number {
  return typeof value === 'number' && Number.isInteger(value) && value >= 1 && value <= 12;
}

/** The chance a trait can be seen now, and a sentence saying why when it is below 1. */
export interface SeeingChance {
  chance: number;
  /** empty when the chance is 1 for the plain reason that the part is in hand */
  reason: string;
}

/**
 * The chance the observer can see a trait on what is in hand in the given month (1–12, or undefined
 * when not known). A part already observed is in hand, so its traits count as seen for sure; so does
 * a part picked up on its own (a cone or fruit in hand is there whatever the month).
 */
export function seeingChance(
  trait: { readonly code: string; readonly part: PlantPart; readonly season: Season },
  inHand: InHand,
  month: number | undefined,
  partsSeen: ReadonlySet<PlantPart> = new Set(),
): SeeingChance {
  if (!IN_HAND_PARTS[inHand].includes(trait.part)) return { chance: 0, reason: `not on ${IN_HAND_LABELS[inHand]}` };
  const availability =
    AVAILABILITY_BY_TRAIT[trait.code] ?? (inHand === 'standing-tree' && !partsSeen.has(trait.part) ? AVAILABILITY_BY_PART[trait.part] : undefined);
  if (!availability) return { chance: 1, reason: '' };
  const present = AVAILABILITY_BY_TRAIT[trait.code] && (inHand !== 'standing-tree' || partsSeen.has(trait.part)) ? 1 : availability.present;
  let seasonal: number;
  let when: string;
  if (!isMonth(month)) {
    seasonal = availability.months.length === 12 ? 1 : MONTH_UNKNOWN_CHANCE;
    when = seasonal === 1 ? '' : ` for part of the year (the month is not given)`;
  } else if (availability.months.includes(month)) {
    seasonal = 1;
    when = ` in ${MONTH_NAMES[month - 1] ?? 'this month'}`;
  } else if (availability.held.includes(month)) {
    seasonal = availability.heldChance;
    when = ` in ${MONTH_NAMES[month - 1] ?? 'this month'}, where some hangs on or lies beneath`;
  } else {
    seasonal = availability.outside;
    when = ` in ${MONTH_NAMES[month - 1] ?? 'this month'}, out of its season`;
  }
  const chance = present * seasonal;
  if (chance >= 1) return { chance: 1, reason: '' };
  if (chance <= 0) return { chance: 0, reason: `no ${availability.what} to see${when}` };
  const share = Math.round(chance * 100);
  return { chance, reason: `about ${share}% of trees show ${availability.what}${when}` };
}
