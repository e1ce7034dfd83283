import type { Trait } from '@shared/engine';
import type { EditionCatalog } from '../editions/edition-catalog';

/** Where the web app serves the value drawings. */
export const ILLUSTRATIONS_URL = '/illustrations/';

export interface TraitValueView {
  code: string;
  label: string;
  definition: string | null;
  synonyms: string[];
  illustrationUrl: string | null;
}

export interface TraitView {
  code: string;
  label: string;
  part: string;
  kind: Trait['kind'];
  unit: 'cm' | null;
  season: Trait['season'];
  ease: number;
  errorRate: number;
  help: string | null;
  appliesWhen: Record<string, string[]> | null;
  countRange: { min: number; max: number } | null;
  values: TraitValueView[];
}

export function traitView(trait: Trait): TraitView {
  return {
    code: trait.code,
    label: trait.label,
    part: trait.part,
    kind: trait.kind,
    unit: trait.unit ?? null,
    season: trait.season,
    ease: trait.ease,
    errorRate: trait.errorRate,
    help: trait.help ?? null,
    appliesWhen: trait.appliesWhen ?? null,
    countRange: trait.countRange ?? null,
    values: (trait.values ?? []).map((value) => ({
      code: value.code,
      label: value.label,
      definition: value.definition ?? null,
      synonyms: value.synonyms ?? [],
      illustrationUrl: value.illustration ? ILLUSTRATIONS_URL + value.illustration : null,
    })),
  };
}

/** The traits of the current edition with their values, help and drawings. */
async function listPublishedTraits(editions: EditionCatalog): Promise<{ edition: { id: number; publishedAt: string }; traits: TraitView[] }> {
  const edition = await editions.current();
  return { edition: edition.reference, traits: edition.document.traits.map(traitView) };
}

/** The current edition's trait vocabulary. */
export function traitsService(editions: EditionCatalog) {
  return {
    list: listPublishedTraits.bind(null, editions),
  };
}

export type TraitsService = ReturnType<typeof traitsService>;
