/**
 * What the Matrix desk's write routes answer: the working-matrix rows reduced to the fields
 * openapi.yaml documents (`CuratedTaxon`, `CuratedTrait`, `CuratedTraitValue`), so bookkeeping
 * columns (positions, timestamps) never leak into the contract.
 */
import type { TaxonFields, TraitFields, ValueFields } from './entity-service';

type Row<T> = Partial<T> & Record<string, unknown>;

export interface CuratedTaxonView {
  id: string;
  scientificName: string;
  authority: string;
  family: string;
  commonNames: string[];
  status: TaxonFields['status'];
  prior: number;
  source: string | null;
  habitat: string | null;
  range: string | null;
  cautions: string[];
  lookAlikes: string[];
  retired: boolean;
}

export function curatedTaxonView(row: Row<TaxonFields> & { id: string }): CuratedTaxonView {
  return {
    id: row.id,
    scientificName: row.scientificName ?? '',
    authority: row.authority ?? '',
    family: row.family ?? '',
    commonNames: row.commonNames ?? [],
    status: row.status ?? null,
    prior: row.prior ?? 1,
    source: row.source ?? null,
    habitat: row.habitat ?? null,
    range: row.range ?? null,
    cautions: row.cautions ?? [],
    lookAlikes: row.lookAlikes ?? [],
    retired: row.retired ?? false,
  };
}

export interface CuratedValueView {
  traitCode: string;
  code: string;
  label: string;
  definition: string | null;
  illustration: string | null;
  synonyms: string[];
  retired: boolean;
}

export function curatedValueView(traitCode: string, row: Row<ValueFields> & { code: string }): CuratedValueView {
  return {
    traitCode,
    code: row.code,
    label: row.label ?? '',
    definition: row.definition ?? null,
    illustration: row.illustration ?? null,
    synonyms: row.synonyms ?? [],
    retired: row.retired ?? false,
  };
}

export interface CuratedTraitView {
  code: string;
  label: string;
  part: TraitFields['part'];
  kind: TraitFields['kind'];
  unit: 'cm' | null;
  season: TraitFields['season'];
  ease: number;
  errorRate: number;
  help: string | null;
  appliesWhen: Record<string, string[]> | null;
  countRange: { min: number; max: number } | null;
  retired: boolean;
  /** on creation only: the values created with the trait, in order */
  values?: CuratedValueView[];
}

export function curatedTraitView(
  row: Row<TraitFields> & Pick<TraitFields, 'label' | 'part' | 'kind' | 'season' | 'ease' | 'errorRate'> & { code: string },
  values?: ReadonlyArray<Row<ValueFields> & { code: string }>,
): CuratedTraitView {
  return {
    code: row.code,
    label: row.label,
    part: row.part,
    kind: row.kind,
    unit: row.unit ?? null,
    season: row.season,
    ease: row.ease,
    errorRate: row.errorRate,
    help: row.help ?? null,
    appliesWhen: row.appliesWhen ?? null,
    countRange: row.countRange ?? null,
    retired: row.retired ?? false,
    ...(values && { values: values.map((value) => curatedValueView(row.code, value)) }),
  };
}
