import type { Sequelize } from 'sequelize';
import type { Principal } from '../auth/principal';
import { problems, type InvalidParam } from '../http/problem';
import { writeTransaction } from '../matrix/write-transaction';
import {
  deleteStudySet,
  findTaxa,
  insertStudySet,
  readStudySets,
  replaceTaxa,
  updateStudySet,
  type StudyData,
  type StudySet,
  type StudySetFields,
} from './study-store';

type User = Extract<Principal, { kind: 'user' }>;

/** How many species one study set may hold. */
export const MAX_STUDY_SET_TAXA = 200;

export type NewStudySet = StudySetFields & { taxa: string[] };
export type StudySetChange = Partial<NewStudySet>;

const isAdmin = (user: User) => user.role === 'admin';
const mayChange = (user: User, set: StudySet) => isAdmin(user) || set.ownerId === user.userId;
const mayRead = (user: User, set: StudySet) => mayChange(user, set) || set.shared;

const notVisible = (id: number) => problems.notFound(`There is no study set ${id} you can see.`);

/**
 * Every reason the species list cannot be saved, each naming the item: empty or too long, a species
 * given twice, one the working matrix does not have, or one that is retired.
 */
function speciesProblems(ids: string[], known: Map<string, { retired: boolean }>): InvalidParam[] {
  if (ids.length === 0) return [{ name: '/taxa', reason: 'a study set needs at least one species' }];
  if (ids.length > MAX_STUDY_SET_TAXA)
    return [{ name: '/taxa', reason: `a study set holds at most ${MAX_STUDY_SET_TAXA} species; this list has ${ids.length}` }];
  const firstAt = new Map<string, number>();
  const invalid: InvalidParam[] = [];
  ids.forEach((id, index) => {
    const name = `/taxa/${index}`;
    const first = firstAt.get(id);
    if (first !== undefined) invalid.push({ name, reason: `${id} is already in the list at /taxa/${first}` });
    else {
      firstAt.set(id, index);
      const taxon = known.get(id);
      if (!taxon) invalid.push({ name, reason: `there is no taxon ${id} in the matrix` });
      else if (taxon.retired) invalid.push({ name, reason: `${id} is retired from the matrix` });
    }
  });
  return invalid;
}

export interface StudyDeps {
  sequelize: Sequelize;
  models: StudyData;
}

export function studyService(deps: StudyDeps) {
  const { sequelize, models: data } = deps;

  async function one(id: number): Promise<StudySet | undefined> {
    const [set] = await readStudySets(data, { id });
    return set;
  }

  async function checkSpecies(ids: string[]): Promise<void> {
    const invalid = speciesProblems(ids, await findTaxa(data, ids));
    if (invalid.length > 0) throw problems.invalidInput('The species list cannot be saved as it is; invalid-params names each problem.', invalid);
  }

  /** The set if the user may change it: 404 when they cannot see it, 403 when they can only read it. */
  async function changeable(actor: User, id: number): Promise<StudySet> {
    const set = await one(id);
    if (!set || !mayRead(actor, set)) throw notVisible(id);
    if (!mayChange(actor, set)) throw problems.forbidden(`Only the coach who made study set ${id}, or an admin, can change it.`);
    return set;
  }

  return {
    /** A coach (or admin) makes a set they own; the species keep the order given. */
    async create(actor: User, input: NewStudySet): Promise<StudySet> {
      await checkSpecies(input.taxa);
      const id = await writeTransaction(sequelize, (transaction) => insertStudySet(data, { ...input, ownerId: actor.userId }, input.taxa, transaction));
      const set = await one(id);
      if (!set) throw new Error(`study set ${id} vanished after it was written`);
      return set;
    },

    /** Coaches see their own sets; admins see everyone's. */
    list(actor: User): Promise<StudySet[]> {
      return readStudySets(data, isAdmin(actor) ? {} : { ownerId: actor.userId });
    },

    /** The owner and admins always; anyone signed in when the set is shared. */
    async get(actor: User, id: number): Promise<StudySet> {
      const set = await one(id);
      if (!set || !mayRead(actor, set)) throw notVisible(id);
      return set;
    },

    /** Replaces the fields given; `taxa`, when given, replaces the whole species list. */
    async change(actor: User, id: number, change: StudySetChange): Promise<StudySet> {
      await changeable(actor, id);
      const { taxa, ...fields } = change;
      if (taxa !== undefined) await checkSpecies(taxa);
      await writeTransaction(sequelize, async (transaction) => {
        await updateStudySet(data, id, fields, transaction);
        if (taxa !== undefined) await replaceTaxa(data, id, taxa, transaction);
      });
      const set = await one(id);
      if (!set) throw notVisible(id);
      return set;
    },

    async remove(actor: User, id: number): Promise<void> {
      await changeable(actor, id);
      const deleted = await writeTransaction(sequelize, (transaction) => deleteStudySet(data, id, transaction));
      if (!deleted) throw notVisible(id);
    },
  };
}

export type StudyService = ReturnType<typeof studyService>;
