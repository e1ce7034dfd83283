import { UniqueConstraintError } from 'sequelize';
import type { PlantPart, Season, TraitKind } from '@shared/engine';
import { problems } from '../http/problem';
import { recordAudit, type Actor } from '../matrix/audit-store';
import type { CurationDeps } from './cell-service';
import { changeKeepingMatrixValid } from './matrix-guard';
import { writeTransaction } from '../matrix/write-transaction';

export interface TaxonFields {
  scientificName: string;
  authority: string;
  family: string;
  commonNames: string[];
  status: 'native' | 'naturalised' | 'introduced' | null;
  prior: number;
  source: string | null;
  habitat: string | null;
  range: string | null;
  cautions: string[] | null;
  lookAlikes: string[] | null;
  retired: boolean;
}

export interface TraitFields {
  label: string;
  part: PlantPart;
  kind: TraitKind;
  unit: 'cm' | null;
  season: Season;
  ease: number;
  errorRate: number;
  help: string | null;
  appliesWhen: Record<string, string[]> | null;
  countRange: { min: number; max: number } | null;
  retired: boolean;
}

export interface ValueFields {
  label: string;
  definition: string | null;
  illustration: string | null;
  synonyms: string[] | null;
  retired: boolean;
}

const TAXON_KEYS = [
  'scientificName',
  'authority',
  'family',
  'commonNames',
  'status',
  'prior',
  'source',
  'habitat',
  'range',
  'cautions',
  'lookAlikes',
  'retired',
] as const;
const TRAIT_KEYS = ['label', 'part', 'kind', 'unit', 'season', 'ease', 'errorRate', 'help', 'appliesWhen', 'countRange', 'retired'] as const;
const EDITABLE_TRAIT_KEYS = ['label', 'part', 'unit', 'season', 'ease', 'errorRate', 'help', 'appliesWhen', 'countRange', 'retired'] as const;
const VALUE_KEYS = ['label', 'definition', 'illustration', 'synonyms', 'retired'] as const;

function pick<T extends object, K extends keyof T>(source: T, keys: readonly K[]): Pick<T, K> {
  return Object.fromEntries(keys.filter((key) => source[key] !== undefined).map((key) => [key, source[key]])) as Pick<T, K>;
}

function taken(what: string): never {
  throw problems.conflict(`${what} already exists.`);
}

/** Adds a taxon to the working matrix (its cells start unknown). */
async function createTaxon(
  deps: CurationDeps,
  actor: Actor,
  id: string,
  fields: Partial<TaxonFields> & Pick<TaxonFields, 'scientificName' | 'authority' | 'family' | 'commonNames'>,
  reason: string,
) {
  return writeTransaction(deps.sequelize, async (transaction) => {
    const created = await changeKeepingMatrixValid(deps.models, transaction, `The taxon "${id}"`, () =>
      deps.models.Taxon.create({ id, ...pick(fields, TAXON_KEYS) }, { transaction }),
    );
    const after = created.get({ plain: true });
    await recordAudit(deps.models, actor, [{ entity: 'taxon', entityKey: id, action: 'create', before: null, after, reason }], transaction);
    return after;
  }).catch((error: unknown) =>
    error instanceof UniqueConstraintError ? taken(`A taxon with the id "${id}" or the name "${fields.scientificName}"`) : Promise.reject(error),
  );
}

/** Changes a taxon's descriptive fields, or retires it (`retired: true`) so the next edition leaves it out. */
async function updateTaxon(deps: CurationDeps, actor: Actor, id: string, fields: Partial<TaxonFields>, reason: string) {
  return writeTransaction(deps.sequelize, async (transaction) => {
    const taxon = await deps.models.Taxon.findByPk(id, { transaction });
    if (!taxon) throw problems.notFound(`There is no taxon "${id}" in the working matrix.`);
    const before = { ...taxon.get({ plain: true }) };
    await changeKeepingMatrixValid(deps.models, transaction, `The taxon "${id}"`, () => taxon.update(pick(fields, TAXON_KEYS), { transaction }));
    const after = taxon.get({ plain: true });
    const action = fields.retired === true && !before.retired ? 'retire' : 'update';
    await recordAudit(deps.models, actor, [{ entity: 'taxon', entityKey: id, action, before, after, reason }], transaction);
    return after;
  }).catch((error: unknown) => (error instanceof UniqueConstraintError ? taken(`A taxon named "${fields.scientificName}"`) : Promise.reject(error)));
}

/** Adds a trait (with its values) to the working matrix. */
async function createTrait(
  deps: CurationDeps,
  actor: Actor,
  code: string,
  fields: Partial<TraitFields> & Pick<TraitFields, 'label' | 'part' | 'kind' | 'season' | 'ease' | 'errorRate'>,
  values: Array<{ code: string } & Partial<ValueFields> & Pick<ValueFields, 'label'>>,
  reason: string,
) {
  return writeTransaction(deps.sequelize, async (transaction) => {
    const position = ((await deps.models.Trait.max<number | null, InstanceType<typeof deps.models.Trait>>('position', { transaction })) ?? 0) + 1;
    await changeKeepingMatrixValid(deps.models, transaction, `The trait "${code}"`, async () => {
      await deps.models.Trait.create(
        {
          code,
          ...pick(fields, TRAIT_KEYS),
          position,
          unit: fields.unit ?? null,
          help: fields.help ?? null,
          appliesWhen: fields.appliesWhen ?? null,
          countRange: fields.countRange ?? null,
        },
        { transaction },
      );
      await deps.models.TraitValue.bulkCreate(
        values.map((value, index) => ({
          traitCode: code,
          code: value.code,
          ...pick(value, VALUE_KEYS),
          definition: value.definition ?? null,
          illustration: value.illustration ?? null,
          synonyms: value.synonyms ?? null,
          position: index,
        })),
        { transaction },
      );
    });
    const after = { code, ...fields, values };
    await recordAudit(deps.models, actor, [{ entity: 'trait', entityKey: code, action: 'create', before: null, after, reason }], transaction);
    return after;
  }).catch((error: unknown) =>
    error instanceof UniqueConstraintError ? taken(`A trait with the code "${code}" (or a repeated value code)`) : Promise.reject(error),
  );
}

/** Changes a trait's definition, or retires it. Its kind cannot change: its cells were coded for that kind. */
async function updateTrait(deps: CurationDeps, actor: Actor, code: string, fields: Partial<Omit<TraitFields, 'kind'>>, reason: string) {
  return writeTransaction(deps.sequelize, async (transaction) => {
    const trait = await deps.models.Trait.findByPk(code, { transaction });
    if (!trait) throw problems.notFound(`There is no trait "${code}" in the working matrix.`);
    const before = { ...trait.get({ plain: true }) };
    await changeKeepingMatrixValid(deps.models, transaction, `The trait "${code}"`, () => trait.update(pick(fields, EDITABLE_TRAIT_KEYS), { transaction }));
    const after = trait.get({ plain: true });
    const action = fields.retired === true && !before.retired ? 'retire' : 'update';
    await recordAudit(deps.models, actor, [{ entity: 'trait', entityKey: code, action, before, after, reason }], transaction);
    return after;
  });
}

/** Adds a value to a state trait. */
async function createValue(
  deps: CurationDeps,
  actor: Actor,
  traitCode: string,
  code: string,
  fields: Partial<ValueFields> & Pick<ValueFields, 'label'>,
  reason: string,
) {
  return writeTransaction(deps.sequelize, async (transaction) => {
    const trait = await deps.models.Trait.findByPk(traitCode, { transaction });
    if (!trait) throw problems.notFound(`There is no trait "${traitCode}" in the working matrix.`);
    const position =
      ((await deps.models.TraitValue.max<number | null, InstanceType<typeof deps.models.TraitValue>>('position', { where: { traitCode }, transaction })) ?? 0) +
      1;
    const created = await changeKeepingMatrixValid(deps.models, transaction, `The value "${traitCode}/${code}"`, () =>
      deps.models.TraitValue.create(
        {
          traitCode,
          code,
          ...pick(fields, VALUE_KEYS),
          definition: fields.definition ?? null,
          illustration: fields.illustration ?? null,
          synonyms: fields.synonyms ?? null,
          position,
        },
        { transaction },
      ),
    );
    const after = created.get({ plain: true });
    await recordAudit(
      deps.models,
      actor,
      [{ entity: 'trait-value', entityKey: `${traitCode}/${code}`, action: 'create', before: null, after, reason }],
      transaction,
    );
    return after;
  }).catch((error: unknown) => (error instanceof UniqueConstraintError ? taken(`The value "${traitCode}/${code}"`) : Promise.reject(error)));
}

/** Changes a value's label, definition, drawing or synonyms, or retires it (refused while cells still use it). */
async function updateValue(deps: CurationDeps, actor: Actor, traitCode: string, code: string, fields: Partial<ValueFields>, reason: string) {
  return writeTransaction(deps.sequelize, async (transaction) => {
    const value = await deps.models.TraitValue.findOne({ where: { traitCode, code }, transaction });
    if (!value) throw problems.notFound(`There is no value "${traitCode}/${code}" in the working matrix.`);
    const before = { ...value.get({ plain: true }) };
    await changeKeepingMatrixValid(deps.models, transaction, `The value "${traitCode}/${code}"`, () => value.update(pick(fields, VALUE_KEYS), { transaction }));
    const after = value.get({ plain: true });
    const action = fields.retired === true && !before.retired ? 'retire' : 'update';
    await recordAudit(deps.models, actor, [{ entity: 'trait-value', entityKey: `${traitCode}/${code}`, action, before, after, reason }], transaction);
    return after;
  });
}

/** Taxa, traits and values of the working matrix; every change keeps the matrix valid and is audited. */
export function entityService(deps: CurationDeps) {
  return {
    createTaxon: createTaxon.bind(null, deps),
    updateTaxon: updateTaxon.bind(null, deps),
    createTrait: createTrait.bind(null, deps),
    updateTrait: updateTrait.bind(null, deps),
    createValue: createValue.bind(null, deps),
    updateValue: updateValue.bind(null, deps),
  };
}

export type EntityService = ReturnType<typeof entityService>;
