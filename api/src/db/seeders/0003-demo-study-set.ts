import type { Step } from '../step';
import { deleteStudySet, findTaxa, insertStudySet } from '../../study/study-store';
import { DEMO_ACCOUNTS, DEMO_CLUB, DEMO_EVENT } from './0002-demo-scenario';

/** The demo coach's species list for the invented meet; every id is in the reference matrix. */
export const DEMO_STUDY_SET = {
  name: 'Bramblewood Valley meet: Piedmont trees',
  event: DEMO_EVENT,
  eventDate: '2027-04-17',
  notes: `The ${DEMO_CLUB} list for the ${DEMO_EVENT}. Learn each one from leaf, twig and bark; the meet runs in early spring, so expect bare twigs on the hardwoods.`,
  shared: true,
  taxa: [
    'pinus-taeda',
    'pinus-echinata',
    'pinus-palustris',
    'pinus-virginiana',
    'pinus-strobus',
    'juniperus-virginiana',
    'quercus-alba',
    'quercus-rubra',
    'quercus-falcata',
    'quercus-stellata',
    'quercus-nigra',
    'quercus-phellos',
    'acer-rubrum',
    'acer-saccharum',
    'carya-tomentosa',
    'carya-glabra',
    'carya-ovata',
    'liquidambar-styraciflua',
    'liriodendron-tulipifera',
    'cornus-florida',
    'cercis-canadensis',
    'nyssa-sylvatica',
    'diospyros-virginiana',
    'sassafras-albidum',
    'platanus-occidentalis',
    'prunus-serotina',
  ],
} as const;

const coachEmail = () => {
  const coach = DEMO_ACCOUNTS.find((a) => a.role === 'coach');
  if (!coach) throw new Error('the demo scenario has no coach');
  return coach.email;
};

/**
 * The demo coach's shared study set. It belongs with the demo accounts: where the demo scenario was
 * not seeded (production without SEED_DEMO), there is no coach and nothing is added.
 */
export const demoStudySet: Step = {
  name: '0003-demo-study-set',
  async up({ context: { sequelize, models, logger } }) {
    const coach = await models.User.findOne({ where: { email: coachEmail() } });
    if (!coach) {
      logger?.info('demo study set skipped: the demo scenario is not seeded');
      return;
    }
    const known = await findTaxa(models, [...DEMO_STUDY_SET.taxa]);
    const taxa = DEMO_STUDY_SET.taxa.filter((id) => known.get(id)?.retired === false);
    const missing = DEMO_STUDY_SET.taxa.filter((id) => !taxa.includes(id));
    if (missing.length > 0) logger?.warn({ missing }, 'demo study set: species left out, not in the matrix or retired');
    await sequelize.transaction((transaction) =>
      insertStudySet(
        models,
        {
          name: DEMO_STUDY_SET.name,
          event: DEMO_STUDY_SET.event,
          eventDate: DEMO_STUDY_SET.eventDate,
          notes: DEMO_STUDY_SET.notes,
          shared: DEMO_STUDY_SET.shared,
          ownerId: coach.id,
        },
        taxa,
        transaction,
      ),
    );
  },
  async down({ context: { sequelize, models } }) {
    const coach = await models.User.findOne({ where: { email: coachEmail() } });
    if (!coach) return;
    const sets = await models.StudySet.findAll({ where: { ownerId: coach.id, name: DEMO_STUDY_SET.name } });
    await sequelize.transaction(async (transaction) => {
      for (const set of sets) await deleteStudySet(models, set.id, transaction);
    });
  },
};
