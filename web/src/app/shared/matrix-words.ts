/** Plain words for traits, cells and observations, shared by the sift and species pages. */
import { inSentence } from '@shared/engine';
import type { CompiledMatrix, CompiledTrait, TaxonInfo } from '@shared/engine/compiled';
import type { Cell, DiscreteCell, NumericCell, Observation, PlantPart } from '@shared/engine/types';

export const PART_ORDER: readonly PlantPart[] = ['leaf', 'needle', 'cone', 'fruit', 'flower', 'twig', 'bark', 'form'];

export const PART_LABELS: Readonly<Record<PlantPart, string>> = {
  leaf: 'Leaf',
  needle: 'Needle',
  cone: 'Cone',
  fruit: 'Fruit',
  flower: 'Flower',
  twig: 'Twig and bud',
  bark: 'Bark',
  form: 'Form',
};

export const ILLUSTRATION_ROOT = '/illustrations/';

export function illustrationUrl(path: string | undefined): string | null {
  return path ? ILLUSTRATION_ROOT + path.replace(/^\/+/, '') : null;
}

/** The display label of one answer (a state code or a count) of a discrete trait. */
export function answerLabel(trait: CompiledTrait, answer: string | number): string {
  const index = trait.answerCodes.findIndex((code) => String(code) === String(answer));
  if (index >= 0 && trait.answerLabels[index]) return trait.answerLabels[index];
  return String(answer);
}

export function isNumericCell(cell: Cell): cell is NumericCell {
  return typeof cell === 'object' && 'low' in cell;
}

export function isDiscreteCell(cell: Cell): cell is DiscreteCell {
  return typeof cell === 'object' && !('low' in cell);
}

function range(from: number, to: number): string {
  return from === to ? `${from}` : `${from}–${to}`;
}

/** A cell in words: "3 per bundle; occasionally 2", "15–23 cm (10–25)", "not coded yet". */
export function describeCell(trait: CompiledTrait, cell: Cell): string {
  if (cell === 'unknown') return 'not coded yet';
  if (cell === 'inapplicable') return 'does not apply';
  if (isNumericCell(cell)) {
    const typical = `${range(cell.low, cell.high)} cm`;
    return cell.min < cell.low || cell.max > cell.high ? `${typical} (${range(cell.min, cell.max)})` : typical;
  }
  // only the very first label keeps its capital: "Scales, awl-shaped; occasionally flattened"
  const words = (values: Array<string | number> | undefined, first: boolean) =>
    (values ?? []).map((value, i) => (first && i === 0 ? answerLabel(trait, value) : inSentence(answerLabel(trait, value)))).join(', ');
  const parts = [words(cell.usual, true)];
  const opening = parts[0] === '';
  if (cell.occasional?.length) parts.push(`occasionally ${words(cell.occasional, false)}`);
  if (cell.rare?.length) parts.push(`rarely ${words(cell.rare, false)}`);
  if (opening && parts.length > 1) parts[1] = parts[1].charAt(0).toUpperCase() + parts[1].slice(1);
  return parts.filter((part) => part !== '').join('; ');
}

/** An observation in words: "Needles per bundle: 3 per bundle", "Needle length: 6 in". */
export function describeObservation(compiled: CompiledMatrix, observation: Observation): { label: string; value: string } {
  const index = compiled.traitIndexByCode.get(observation.trait);
  const trait = index === undefined ? undefined : compiled.traits[index];
  const label = trait?.label ?? observation.trait;
  if ('value' in observation) return { label, value: `${observation.value} ${observation.unit ?? 'cm'}` };
  const value = observation.values.map((answer) => (trait ? answerLabel(trait, answer) : String(answer))).join(' or ');
  return { label, value };
}

/** The first common name, capitalised for headings and lists ("Eastern white pine"). */
export function commonName(taxon: TaxonInfo): string {
  const name = taxon.commonNames[0];
  return name ? name.charAt(0).toUpperCase() + name.slice(1) : taxon.scientificName;
}
