/** What the study sheet and the drills take from the engine for one study set. */
import {
  buildKey,
  cellInBrief,
  cellOf,
  commonName,
  diagnose,
  isDiscreteCell,
  type Cell,
  type CompiledMatrix,
  type CompiledTrait,
  type DichotomousKey,
  type KeyNode,
  type SeparationStrength,
} from '@shared/engine';
import { illustrationUrl } from '../../shared/matrix-words';

export interface Drawing {
  url: string;
  label: string;
}

/** One trait that tells a species apart from others of its set. */
export interface SeparatingTrait {
  trait: string;
  label: string;
  /** how the species itself is coded for it, in words */
  here: string;
  drawings: Drawing[];
  strength: SeparationStrength;
  /** names of the set's species this trait sets apart (those not already set apart by an earlier trait) */
  separates: string[];
}

export interface SpeciesDiagnosis {
  id: string;
  name: string;
  scientificName: string;
  traits: SeparatingTrait[];
  /** names of the set's species nothing coded tells apart from this one */
  unseparated: string[];
}

export interface KeyLeadRow {
  label: string;
  text: string;
  /** the couplet to go to, or the species reached */
  goTo: number | null;
  reached: Array<{ id: string; name: string; scientificName: string }>;
}

export interface KeyCoupletRow {
  number: number;
  leads: [KeyLeadRow, KeyLeadRow];
}

export function nameOf(compiled: CompiledMatrix, id: string): string {
  const taxon = compiled.taxa[compiled.taxonIndexById.get(id) ?? -1];
  return taxon ? commonName(taxon) : id;
}

function traitOf(compiled: CompiledMatrix, code: string): CompiledTrait | undefined {
  const index = compiled.traitIndexByCode.get(code);
  return index === undefined ? undefined : compiled.traits[index];
}

/** The drawings of the values a species usually or occasionally shows, where the trait has any. */
export function drawingsOf(trait: CompiledTrait, cell: Cell): Drawing[] {
  if (!isDiscreteCell(cell)) return [];
  const coded = [...(cell.usual ?? []), ...(cell.occasional ?? [])].map(String);
  return trait.values.flatMap((value) => {
    const url = coded.includes(value.code) ? illustrationUrl(value.illustration) : null;
    return url ? [{ url, label: value.label }] : [];
  });
}

/** The set's ids the edition holds, in the set's order, each once. */
export function idsInEdition(compiled: CompiledMatrix, ids: readonly string[]): string[] {
  return [...new Set(ids)].filter((id) => compiled.taxonIndexById.has(id));
}

/** The traits that set one species apart from the rest of its set (greedy set cover, from the engine). */
export function diagnoseInSet(compiled: CompiledMatrix, id: string, setIds: readonly string[]): SpeciesDiagnosis {
  const among = setIds.filter((other) => other !== id);
  const result = diagnose(compiled, id, among);
  const index = compiled.taxonIndexById.get(id);
  const taxon = index === undefined ? undefined : compiled.taxa[index];
  return {
    id,
    name: nameOf(compiled, id),
    scientificName: taxon?.scientificName ?? id,
    traits: result.traits.map((diagnostic) => {
      const trait = traitOf(compiled, diagnostic.trait);
      const cell = trait ? cellOf(compiled, id, diagnostic.trait) : 'unknown';
      return {
        trait: diagnostic.trait,
        label: diagnostic.label,
        here: trait ? cellInBrief(trait, cell) : diagnostic.text,
        drawings: trait ? drawingsOf(trait, cell) : [],
        strength: diagnostic.strength,
        separates: diagnostic.separates.map((other) => nameOf(compiled, other)),
      };
    }),
    unseparated: result.unseparated.map((other) => nameOf(compiled, other)),
  };
}

/** The two-way key as numbered couplets, in print order. */
export function keyRows(compiled: CompiledMatrix, key: DichotomousKey): KeyCoupletRow[] {
  const rows: KeyCoupletRow[] = [];
  const lead = (label: string, text: string, next: KeyNode): KeyLeadRow =>
    next.kind === 'couplet'
      ? { label, text, goTo: next.number, reached: [] }
      : {
          label,
          text,
          goTo: null,
          reached: next.taxa.map((id) => ({
            id,
            name: nameOf(compiled, id),
            scientificName: compiled.taxa[compiled.taxonIndexById.get(id) ?? 0]?.scientificName ?? id,
          })),
        };
  const visit = (node: KeyNode): void => {
    if (node.kind !== 'couplet') return;
    const [first, second] = node.leads;
    rows.push({ number: node.number, leads: [lead(`${node.number}a`, first.text, first.next), lead(`${node.number}b`, second.text, second.next)] });
    visit(first.next);
    visit(second.next);
  };
  visit(key.root);
  return rows.sort((a, b) => a.number - b.number);
}

export function keyForSet(compiled: CompiledMatrix, ids: readonly string[]): KeyCoupletRow[] {
  return ids.length >= 2 ? keyRows(compiled, buildKey(compiled, ids)) : [];
}
