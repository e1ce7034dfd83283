/**
 * Drills from a study set, worked out in the browser from the edition: no request per question.
 *
 * Invariant: every question's choices hold its answer once, and are drawn from the same set.
 */
import Fuse from 'fuse.js';
import { cellInBrief, cellOf, diagnose, shuffled, type CompiledMatrix } from '@shared/engine';
import { type SeparatingTrait, diagnoseInSet, nameOf } from './study-sheet';

/** at most this many species to choose from per question */
export const CHOICES_PER_QUESTION = 4;

export interface DrillChoice {
  id: string;
  name: string;
  scientificName: string;
}

export interface DrillQuestion {
  answer: DrillChoice;
  /** what the learner is shown: the traits that set the answer apart from the rest of the set */
  clues: SeparatingTrait[];
  choices: DrillChoice[];
}

/** How a wrong pick differs from the right answer, trait by trait. */
export interface Difference {
  trait: string;
  label: string;
  answer: string;
  picked: string;
}

function choiceOf(compiled: CompiledMatrix, id: string): DrillChoice {
  const taxon = compiled.taxa[compiled.taxonIndexById.get(id) ?? -1];
  return { id, name: nameOf(compiled, id), scientificName: taxon ? taxon.scientificName : id };
}

/** Species of the set that some coded trait sets apart from the others (a drill can ask for them). */
export function askableIds(compiled: CompiledMatrix, setIds: readonly string[]): string[] {
  return setIds.filter((id) => diagnoseInSet(compiled, id, setIds).traits.length > 0);
}

/**
 * One question per target, in shuffled order, each with up to four choices from the set. The choices
 * keep the set's order, so a species stays in the same place from one question to the next.
 */
export function drillQuestions(compiled: CompiledMatrix, setIds: readonly string[], targets: readonly string[], random: () => number): DrillQuestion[] {
  const place = new Map(setIds.map((id, index) => [id, index]));
  return shuffled(targets, random).map((target) => {
    const others = shuffled(
      setIds.filter((id) => id !== target),
      random,
    ).slice(0, CHOICES_PER_QUESTION - 1);
    return {
      answer: choiceOf(compiled, target),
      clues: diagnoseInSet(compiled, target, setIds).traits,
      choices: [target, ...others].sort((a, b) => (place.get(a) ?? 0) - (place.get(b) ?? 0)).map((id) => choiceOf(compiled, id)),
    };
  });
}

/** The traits that tell the picked species from the right answer, with how each is coded. */
export function differences(compiled: CompiledMatrix, answer: string, picked: string): Difference[] {
  const traitFor = (code: string) => compiled.traits[compiled.traitIndexByCode.get(code) ?? -1];
  return diagnose(compiled, answer, [picked]).traits.flatMap((diagnostic) => {
    const trait = traitFor(diagnostic.trait);
    if (!trait) return [];
    return [
      {
        trait: diagnostic.trait,
        label: diagnostic.label,
        answer: cellInBrief(trait, cellOf(compiled, answer, diagnostic.trait)),
        picked: cellInBrief(trait, cellOf(compiled, picked, diagnostic.trait)),
      },
    ];
  });
}

interface NameEntry {
  id: string;
  names: string[];
}

export type NameReading = { kind: 'species'; choice: DrillChoice } | { kind: 'ambiguous'; names: string[] } | { kind: 'none' };

/** two matches closer than this in Fuse score are too alike to pick one */
const AMBIGUOUS_MARGIN = 0.05;

/** Reads a typed name as one species of the set, tolerating typos; says so when it fits none or several. */
export function nameMatcher(compiled: CompiledMatrix, setIds: readonly string[]): (typed: string) => NameReading {
  const entries: NameEntry[] = setIds.map((id) => {
    // the drill page passes only ids kept to the edition (idsInEdition), so the lookup finds each one
    const taxon = compiled.taxa[compiled.taxonIndexById.get(id) ?? 0]!;
    return { id, names: [taxon.scientificName, ...taxon.commonNames] };
  });
  const fuse = new Fuse(entries, { keys: ['names'], threshold: 0.35, ignoreLocation: true, includeScore: true });
  return (typed) => {
    const words = typed.trim();
    if (words.length < 2) return { kind: 'none' };
    const [best, next] = fuse.search(words, { limit: 3 });
    if (!best) return { kind: 'none' };
    const exact = best.item.names.some((name) => name.toLowerCase() === words.toLowerCase());
    if (!exact && next && (next.score ?? 1) - (best.score ?? 0) < AMBIGUOUS_MARGIN) {
      return { kind: 'ambiguous', names: [best, next].map((result) => nameOf(compiled, result.item.id)) };
    }
    return { kind: 'species', choice: choiceOf(compiled, best.item.id) };
  };
}
