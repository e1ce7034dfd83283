/**
 * Synthetic matrices for benchmarks, property tests and the simulation.
 *
 * Invariant: the document is a pure function of the options (seeded PRNG, no Math.random) and
 * always passes validateMatrix without errors.
 */
import { seededRandom } from './random';
import type { Cell, MatrixDocument, Season, Taxon, Trait, TraitKind } from './types';
import { PLANT_PARTS } from './vocabulary';

export interface SyntheticOptions {
  /** number of taxa */
  taxa: number;
  /** number of traits */
  traits: number;
  /** PRNG seed; the same seed gives the same matrix */
  seed: number;
  /** share of numeric traits */
  numericShare?: number;
  /** share of count traits */
  countShare?: number;
  /** share of cells left unknown */
  unknownRate?: number;
  /** share of discrete cells with more than one value */
  multiValueRate?: number;
  /** share of traits that apply only when the first trait has a given value (the rest are inapplicable) */
  conditionalShare?: number;
  /** taxa per genus; species of a genus share most values, which makes realistic look-alikes */
  genusSize?: number;
  /** share of a species' traits that differ from its genus */
  divergence?: number;
  /** most values a state trait has */
  maxValues?: number;
  /** fewest values a state trait has */
  minValues?: number;
  /** every discrete cell one usual value, nothing unknown, no numeric traits (for exact optimum checks) */
  singleValued?: boolean;
  /** every trait gets this ease instead of a random 1–5 */
  ease?: number;
  /** every trait gets this error rate instead of a random 0.01–0.15 */
  errorRate?: number;
  /** every taxon gets prior 1 instead of a random 0.5–2 */
  uniformPriors?: boolean;
  /** every trait gets this season instead of a random one */
  season?: Season;
}

const DEFAULTS = Object.freeze({
  numericShare: 0.25,
  countShare: 0.15,
  unknownRate: 0.03,
  multiValueRate: 0.15,
  conditionalShare: 0.1,
  genusSize: 6,
  divergence: 0.35,
  maxValues: 8,
  minValues: 2,
});

const SEASONS: readonly Season[] = ['any', 'any', 'leaf-on', 'leaf-on', 'leaf-off'];

function pad(value: number, width: number): string {
  return String(value).padStart(width, '0');
}

interface Prototype {
  /** per trait: a discrete value index, or a numeric centre in cm */
  values: number[];
}

export function generateSyntheticMatrix(options: SyntheticOptions): MatrixDocument {
  const settings = { ...DEFAULTS, ...options };
  const random = seededRandom(options.seed);
  const integer = (min: number, max: number): number => min + Math.floor(random() * (max - min + 1));
  const round = (value: number): number => Math.round(value * 10) / 10;

  const traits: Trait[] = [];
  const taxonCountWidth = String(Math.max(1, options.taxa)).length;
  for (let j = 0; j < options.traits; j++) {
    const roll = random();
    let kind: TraitKind = 'state';
    if (!settings.singleValued && j > 0) {
      if (roll < settings.numericShare) kind = 'numeric';
      else if (roll < settings.numericShare + settings.countShare) kind = 'count';
    }
    const code = `trait-${pad(j + 1, 3)}`;
    const trait: Trait = {
      code,
      label: `Trait ${j + 1}`,
      part: PLANT_PARTS[j % PLANT_PARTS.length],
      kind,
      season: options.season ?? SEASONS[integer(0, SEASONS.length - 1)],
      ease: options.ease ?? integer(1, 5),
      errorRate: options.errorRate ?? round(0.01 + random() * 0.14 * 10) / 10,
    };
    if (kind === 'state') {
      const count = integer(settings.minValues, Math.max(settings.minValues, settings.maxValues));
      trait.values = Array.from({ length: count }, (_, v) => ({ code: `v${v + 1}`, label: `Value ${v + 1} of trait ${j + 1}` }));
    } else if (kind === 'count') {
      trait.countRange = { min: 1, max: integer(3, 8) };
    } else {
      trait.unit = 'cm';
    }
    if (j > 0 && !settings.singleValued && traits[0].kind === 'state' && random() < settings.conditionalShare) {
      trait.appliesWhen = { [traits[0].code]: [traits[0].values?.[0].code ?? 'v1'] };
    }
    traits.push(trait);
  }

  const answerCount = (trait: Trait): number =>
    trait.kind === 'state' ? (trait.values?.length ?? 1) : trait.kind === 'count' ? (trait.countRange?.max ?? 1) - (trait.countRange?.min ?? 1) + 1 : 0;
  const drawPrototype = (): Prototype => ({
    values: traits.map((trait) => (trait.kind === 'numeric' ? Math.exp(Math.log(0.5) + random() * Math.log(100)) : integer(0, answerCount(trait) - 1))),
  });

  const taxa: Taxon[] = [];
  let genus = drawPrototype();
  for (let t = 0; t < options.taxa; t++) {
    if (t % Math.max(1, settings.genusSize) === 0) genus = drawPrototype();
    const own = drawPrototype();
    const values = genus.values.map((value, j) => (random() < settings.divergence ? own.values[j] : value));
    const cells: Record<string, Cell> = {};
    traits.forEach((trait, j) => {
      const condition = trait.appliesWhen ? traits[0] : undefined;
      if (condition && values[0] !== 0) {
        cells[trait.code] = random() < 0.8 ? 'inapplicable' : 'unknown';
        return;
      }
      if (!settings.singleValued && random() < settings.unknownRate) {
        cells[trait.code] = 'unknown';
        return;
      }
      cells[trait.code] =
        trait.kind === 'numeric'
          ? numericCell(values[j], random, round)
          : discreteCell(trait, values[j], answerCount(trait), settings.singleValued ? 0 : settings.multiValueRate, random);
    });
    const number = pad(t + 1, taxonCountWidth);
    taxa.push({
      id: `taxon-${number}`,
      scientificName: `Synthetica exempla ${number}`,
      authority: 'Gen.',
      family: `Family ${Math.floor(t / (settings.genusSize * 4)) + 1}`,
      commonNames: [`Synthetic tree ${number}`],
      ...(options.uniformPriors ? {} : { prior: Math.round((0.5 + random() * 1.5) * 100) / 100 }),
      cells,
    });
  }
  // a condition trait whose first value no taxon shows would make its dependants inapplicable everywhere; fine
  return { format: 'sylvasift-matrix', version: 1, title: `Synthetic ${options.taxa} × ${options.traits} (seed ${options.seed})`, traits, taxa };
}

function numericCell(centre: number, random: () => number, round: (value: number) => number): Cell {
  const spread = 0.15 + random() * 0.35;
  const low = Math.max(0.1, round(centre * (1 - spread)));
  const high = Math.max(low, round(centre * (1 + spread)));
  const min = Math.max(0, round(low * (0.7 + random() * 0.2)));
  const max = Math.max(high, round(high * (1.1 + random() * 0.3)));
  return { min: Math.min(min, low), low, high, max };
}

function discreteCell(trait: Trait, value: number, answers: number, multiValueRate: number, random: () => number): Cell {
  const code = (index: number): string | number => (trait.kind === 'count' ? (trait.countRange?.min ?? 1) + index : (trait.values?.[index].code ?? 'v1'));
  if (answers < 2 || random() >= multiValueRate) return { usual: [code(value)] };
  let other = Math.floor(random() * (answers - 1));
  if (other >= value) other++;
  const roll = random();
  if (roll < 0.5) return { usual: [code(value), code(other)] };
  if (roll < 0.85) return { usual: [code(value)], occasional: [code(other)] };
  return { usual: [code(value)], rare: [code(other)] };
}
