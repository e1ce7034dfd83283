import { Op, type Transaction } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';
import type { AccountModels } from '../accounts/account-models';
import type { StudyModels } from './study-models';

/** The models study-set data access reads: its own, the taxa on a set and the coach who owns it. Everything leaves as plain objects. */
export type StudyData = StudyModels & Pick<MatrixModels, 'Taxon'> & Pick<AccountModels, 'User'>;

export interface StudySetSpecies {
  id: string;
  scientificName: string;
  commonNames: string[];
  /** retired from the working matrix after the set was made; the set keeps it until the coach edits it */
  retired: boolean;
}

export interface StudySetFields {
  name: string;
  event: string | null;
  eventDate: string | null;
  notes: string | null;
  shared: boolean;
}

export interface StudySet extends StudySetFields {
  id: number;
  ownerId: number;
  ownerName: string;
  /** in the coach's order */
  taxa: StudySetSpecies[];
  createdAt: Date;
  updatedAt: Date;
}

const toColumns = (fields: Partial<StudySetFields>) => ({
  ...(fields.name !== undefined ? { name: fields.name } : {}),
  ...(fields.event !== undefined ? { eventName: fields.event } : {}),
  ...(fields.eventDate !== undefined ? { eventDate: fields.eventDate } : {}),
  ...(fields.notes !== undefined ? { notes: fields.notes } : {}),
  ...(fields.shared !== undefined ? { shared: fields.shared } : {}),
});

/** Which of `ids` the working matrix has, and whether each is retired. */
export async function findTaxa(data: StudyData, ids: string[], transaction?: Transaction): Promise<Map<string, { retired: boolean }>> {
  const rows = await data.Taxon.findAll({ where: { id: { [Op.in]: ids } }, attributes: ['id', 'retired'], transaction });
  return new Map(rows.map((row) => [row.id, { retired: row.retired }]));
}

export async function insertStudySet(
  data: StudyData,
  set: StudySetFields & { ownerId: number },
  taxonIds: string[],
  transaction: Transaction,
): Promise<number> {
  const row = await data.StudySet.create(
    { name: set.name, eventName: set.event, eventDate: set.eventDate, notes: set.notes, shared: set.shared, ownerId: set.ownerId },
    { transaction },
  );
  await replaceTaxa(data, row.id, taxonIds, transaction);
  return row.id;
}

/** Changes the given fields and bumps updatedAt (also when only the species changed). */
export async function updateStudySet(data: StudyData, id: number, fields: Partial<StudySetFields>, transaction: Transaction): Promise<void> {
  await data.StudySet.update({ ...toColumns(fields), updatedAt: new Date() }, { where: { id }, transaction });
}

export async function replaceTaxa(data: StudyData, id: number, taxonIds: string[], transaction: Transaction): Promise<void> {
  await data.StudySetTaxon.destroy({ where: { studySetId: id }, transaction });
  await data.StudySetTaxon.bulkCreate(
    taxonIds.map((taxonId, position) => ({ studySetId: id, taxonId, position })),
    { transaction },
  );
}

/** Deletes the set and its species list; false when there was no such set. */
export async function deleteStudySet(data: StudyData, id: number, transaction: Transaction): Promise<boolean> {
  await data.StudySetTaxon.destroy({ where: { studySetId: id }, transaction });
  return (await data.StudySet.destroy({ where: { id }, transaction })) === 1;
}

/** Study sets with their species (names read from the working matrix), most recently changed first. */
export async function readStudySets(data: StudyData, filter: { id?: number; ownerId?: number }, transaction?: Transaction): Promise<StudySet[]> {
  const where: Record<string, unknown> = {};
  if (filter.id !== undefined) where['id'] = filter.id;
  if (filter.ownerId !== undefined) where['ownerId'] = filter.ownerId;
  const sets = await data.StudySet.findAll({
    where,
    order: [
      ['updatedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    transaction,
  });
  if (sets.length === 0) return [];

  const setIds = sets.map((s) => s.id);
  const links = await data.StudySetTaxon.findAll({
    where: { studySetId: { [Op.in]: setIds } },
    order: [
      ['studySetId', 'ASC'],
      ['position', 'ASC'],
    ],
    transaction,
  });
  const taxa = await data.Taxon.findAll({
    where: { id: { [Op.in]: [...new Set(links.map((l) => l.taxonId))] } },
    attributes: ['id', 'scientificName', 'commonNames', 'retired'],
    transaction,
  });
  const species = new Map(taxa.map((t) => [t.id, { id: t.id, scientificName: t.scientificName, commonNames: t.commonNames, retired: t.retired }]));
  const owners = await data.User.findAll({
    where: { id: { [Op.in]: [...new Set(sets.map((s) => s.ownerId))] } },
    attributes: ['id', 'displayName'],
    transaction,
  });
  const ownerNames = new Map(owners.map((o) => [o.id, o.displayName]));

  return sets.map((set) => ({
    id: set.id,
    name: set.name,
    event: set.eventName,
    eventDate: set.eventDate,
    notes: set.notes,
    shared: set.shared,
    ownerId: set.ownerId,
    ownerName: ownerNames.get(set.ownerId) ?? 'someone',
    taxa: links.filter((l) => l.studySetId === set.id).flatMap((l) => species.get(l.taxonId) ?? []),
    createdAt: set.createdAt,
    updatedAt: set.updatedAt,
  }));
}
