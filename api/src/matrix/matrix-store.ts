import type { Transaction } from 'sequelize';
import type { Cell, MatrixDocument, Taxon, Trait } from '@shared/engine';
import type { MatrixModels } from './matrix-models';

/** Writes a whole matrix document into empty working-matrix tables (seeding, restore of a draft). */
export async function insertMatrixDocument(models: MatrixModels, doc: MatrixDocument, transaction: Transaction): Promise<void> {
  await models.Trait.bulkCreate(
    doc.traits.map((trait, position) => ({
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
      position,
    })),
    { transaction },
  );
  await models.TraitValue.bulkCreate(
    doc.traits.flatMap((trait) =>
      (trait.values ?? []).map((value, position) => ({
        traitCode: trait.code,
        code: value.code,
        label: value.label,
        definition: value.definition ?? null,
        illustration: value.illustration ?? null,
        synonyms: value.synonyms ?? null,
        position,
      })),
    ),
    { transaction },
  );
  await models.Taxon.bulkCreate(
    doc.taxa.map((taxon) => ({
      id: taxon.id,
      scientificName: taxon.scientificName,
      authority: taxon.authority,
      family: taxon.family,
      commonNames: taxon.commonNames,
      status: taxon.status ?? null,
      prior: taxon.prior ?? 1,
      source: taxon.source ?? null,
      habitat: taxon.habitat ?? null,
      range: taxon.range ?? null,
      cautions: taxon.cautions ?? null,
      lookAlikes: taxon.lookAlikes ?? null,
    })),
    { transaction },
  );
  await models.Cell.bulkCreate(
    doc.taxa.flatMap((taxon) => Object.entries(taxon.cells).map(([traitCode, value]) => ({ taxonId: taxon.id, traitCode, value }))),
    { transaction },
  );
  await models.InseparablePair.bulkCreate(
    (doc.inseparable ?? []).map((pair) => ({ taxonA: pair.taxa[0], taxonB: pair.taxa[1], reason: pair.reason })),
    { transaction },
  );
}

/** Reads the working matrix (retired taxa and traits left out) as a matrix document. */
export async function readWorkingMatrix(models: MatrixModels, meta: { title: string; region?: string }, transaction?: Transaction): Promise<MatrixDocument> {
  // One read after another: in a transaction they share one connection, and a PostgreSQL connection runs one query at a time.
  const traitRows = await models.Trait.findAll({
    where: { retired: false },
    order: [
      ['position', 'ASC'],
      ['code', 'ASC'],
    ],
    transaction,
  });
  const valueRows = await models.TraitValue.findAll({
    where: { retired: false },
    order: [
      ['position', 'ASC'],
      ['id', 'ASC'],
    ],
    transaction,
  });
  const taxonRows = await models.Taxon.findAll({ where: { retired: false }, order: [['id', 'ASC']], transaction });
  const cellRows = await models.Cell.findAll({ order: [['id', 'ASC']], transaction });
  const pairRows = await models.InseparablePair.findAll({ order: [['id', 'ASC']], transaction });

  const valuesByTrait = new Map<string, typeof valueRows>();
  for (const row of valueRows) {
    const list = valuesByTrait.get(row.traitCode) ?? [];
    list.push(row);
    valuesByTrait.set(row.traitCode, list);
  }
  const traits: Trait[] = traitRows.map((row) => {
    const values = valuesByTrait.get(row.code);
    return stripUndefined({
      code: row.code,
      label: row.label,
      part: row.part,
      kind: row.kind,
      unit: row.unit ?? undefined,
      season: row.season,
      ease: row.ease,
      errorRate: row.errorRate,
      help: row.help ?? undefined,
      values: values?.map((v) =>
        stripUndefined({
          code: v.code,
          label: v.label,
          definition: v.definition ?? undefined,
          illustration: v.illustration ?? undefined,
          synonyms: v.synonyms ?? undefined,
        }),
      ),
      countRange: row.countRange ?? undefined,
      appliesWhen: row.appliesWhen ?? undefined,
    });
  });

  const liveTraits = new Set(traits.map((t) => t.code));
  const cellsByTaxon = new Map<string, Record<string, Cell>>();
  for (const row of cellRows) {
    if (!liveTraits.has(row.traitCode)) continue;
    const cells = cellsByTaxon.get(row.taxonId) ?? {};
    cells[row.traitCode] = row.value;
    cellsByTaxon.set(row.taxonId, cells);
  }
  const taxa: Taxon[] = taxonRows.map((row) =>
    stripUndefined({
      id: row.id,
      scientificName: row.scientificName,
      authority: row.authority,
      family: row.family,
      commonNames: row.commonNames,
      status: row.status ?? undefined,
      prior: row.prior,
      cells: cellsByTaxon.get(row.id) ?? {},
      source: row.source ?? undefined,
      habitat: row.habitat ?? undefined,
      range: row.range ?? undefined,
      cautions: row.cautions ?? undefined,
      lookAlikes: row.lookAlikes ?? undefined,
    }),
  );
  const liveTaxa = new Set(taxa.map((t) => t.id));
  return stripUndefined({
    format: 'sylvasift-matrix' as const,
    version: 1 as const,
    title: meta.title,
    region: meta.region,
    traits,
    taxa,
    inseparable: pairRows
      .filter((p) => liveTaxa.has(p.taxonA) && liveTaxa.has(p.taxonB))
      .map((p) => ({ taxa: [p.taxonA, p.taxonB] as [string, string], reason: p.reason })),
  });
}

/** Drops keys whose value is undefined so stored documents stay minimal and compare equal. */
function stripUndefined<T extends object>(value: T): T {
  return Object.fromEntries(Object.entries(value).filter(([, v]) => v !== undefined)) as T;
}
