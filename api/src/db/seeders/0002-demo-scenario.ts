import { randomBytes } from 'node:crypto';
import { Op } from 'sequelize';
import type { Logger } from 'pino';
import type { Role, Scope } from '../../auth/principal';
import { hashPassword } from '../../auth/passwords';
import { hashToken, KEY_PREFIX, newPartnerKey } from '../../auth/tokens';
import type { SeedConfig, Step } from '../step';

/**
 * The demo scenario: an invented youth forestry club getting ready for an invented regional
 * tree-identification meet. Every person, club, app and place here is made up.
 */
export const DEMO_CLUB = 'Tanager Ridge Youth Forestry Club';
export const DEMO_EVENT = 'Bramblewood Valley Tree Identification Meet';

export interface DemoAccount {
  role: Role;
  displayName: string;
  email: string;
  /** what the person does in the scenario */
  part: string;
}

export const DEMO_ACCOUNTS: readonly DemoAccount[] = [
  { role: 'coach', displayName: 'Marisol Fenwick', email: 'marisol.fenwick@tanager-ridge.example', part: `coach of the ${DEMO_CLUB}` },
  { role: 'learner', displayName: 'Theo Brackett', email: 'theo.brackett@tanager-ridge.example', part: 'student, conifers' },
  { role: 'learner', displayName: 'Ada Quillon', email: 'ada.quillon@tanager-ridge.example', part: 'student, oaks and hickories' },
  { role: 'learner', displayName: 'Sami Verhoek', email: 'sami.verhoek@tanager-ridge.example', part: 'student, first season' },
  { role: 'curator', displayName: 'Harriet Lindqvar', email: 'harriet.lindqvar@sylvasift-demo.example', part: 'keeps the matrix' },
  { role: 'reviewer', displayName: 'Osric Pellaway', email: 'osric.pellaway@sylvasift-demo.example', part: 'botanist working the Second look queue' },
  { role: 'admin', displayName: 'Priya Castellane', email: 'priya.castellane@sylvasift-demo.example', part: 'runs this Sylvasift' },
  { role: 'learner', displayName: 'Leo Marchand-Hale', email: 'leo@fernway-trails.example', part: 'partner developer of the Fernway Trails app' },
];

/** The demo password in development and tests; production demo accounts get random ones nobody sees. */
export const DEMO_PASSWORD = 'tanager-ridge-demo';

const PARTNER_EMAIL = 'leo@fernway-trails.example';
const PARTNER_SCOPES: Scope[] = ['lookup', 'identify'];

/** Doubtful cells the students flagged while practising; codes from the reference matrix. */
const DEMO_QUERIES = [
  {
    by: 'theo.brackett@tanager-ridge.example',
    taxonId: 'pinus-taeda',
    traitCode: 'needles-per-fascicle',
    note: 'On the young pines behind the Tanager Ridge trailhead some bundles had two needles, not three. Should two be coded as occasional?',
  },
  {
    by: 'ada.quillon@tanager-ridge.example',
    taxonId: 'quercus-rubra',
    traitCode: 'bark-texture',
    note: 'The older red oaks by the practice plot have shiny flat stripes between the ridges. Is that coded? It looked like the easiest way to tell them apart.',
  },
];

/** Whether this configuration seeds the demo scenario: always outside production, in production only with SEED_DEMO=true. */
export function seedsDemo(config: Pick<SeedConfig, 'env' | 'demo'>): boolean {
  return config.env !== 'production' || config.demo.seed;
}

/** The demo sign-ins to print when the server starts in development; nothing elsewhere. */
export function demoSignInLines(config: Pick<SeedConfig, 'env' | 'demo'>): string[] {
  if (config.env !== 'development') return [];
  return [
    `Demo accounts (${DEMO_CLUB}, preparing for the ${DEMO_EVENT}), password "${DEMO_PASSWORD}":`,
    ...DEMO_ACCOUNTS.map((a) => `  ${a.role.padEnd(8)} ${a.email.padEnd(42)} ${a.displayName}, ${a.part}`),
    config.demo.partnerKey
      ? `  partner key (lookup, identify): ${config.demo.partnerKey}`
      : '  partner key: printed when the demo was seeded; set DEMO_PARTNER_KEY to fix it',
  ];
}

function say(config: Pick<SeedConfig, 'env'>, logger: Logger | undefined, lines: string[]): void {
  if (config.env !== 'development') return;
  logger?.info({ accounts: DEMO_ACCOUNTS.map((a) => a.email) }, 'demo scenario seeded');
  console.log(`\n${lines.join('\n')}\n`);
}

export const demoScenario: Step = {
  name: '0002-demo-scenario',
  async up({ context: { sequelize, models, config, logger } }) {
    if (!seedsDemo(config)) {
      logger?.info('demo scenario skipped in production (set SEED_DEMO=true to seed it)');
      return;
    }
    const development = config.env !== 'production';
    const key = config.demo.partnerKey ?? newPartnerKey();

    await sequelize.transaction(async (transaction) => {
      const ids = new Map<string, number>();
      for (const account of DEMO_ACCOUNTS) {
        const password = development ? DEMO_PASSWORD : randomBytes(24).toString('base64url');
        const row = await models.User.create(
          {
            email: account.email,
            displayName: account.displayName,
            role: account.role,
            passwordHash: await hashPassword(password, config.auth.scrypt),
            lastSignInAt: null,
          },
          { transaction },
        );
        ids.set(account.email, row.id);
      }

      const partnerId = ids.get(PARTNER_EMAIL);
      if (partnerId === undefined) throw new Error('the demo partner developer is missing');
      await models.PartnerKey.create(
        {
          ownerId: partnerId,
          name: 'Fernway Trails (demo)',
          prefix: key.slice(0, KEY_PREFIX.length + 6),
          keyHash: hashToken(key),
          scopes: PARTNER_SCOPES,
          revokedAt: null,
          revokedBy: null,
          lastUsedAt: null,
        },
        { transaction },
      );

      const cells = await models.Cell.findAll({
        where: { [Op.or]: DEMO_QUERIES.map((q) => ({ taxonId: q.taxonId, traitCode: q.traitCode })) },
        attributes: ['taxonId', 'traitCode'],
        transaction,
      });
      for (const query of DEMO_QUERIES) {
        const raisedBy = ids.get(query.by);
        if (raisedBy === undefined || !cells.some((c) => c.taxonId === query.taxonId && c.traitCode === query.traitCode)) {
          logger?.warn({ taxonId: query.taxonId, traitCode: query.traitCode }, 'demo query skipped: the cell is not in the matrix');
          continue;
        }
        const row = await models.Query.create(
          {
            taxonId: query.taxonId,
            traitCode: query.traitCode,
            note: query.note,
            state: 'open',
            raisedBy,
            answer: null,
            evidence: null,
            answeredBy: null,
            outcome: null,
            settledBy: null,
            settledAt: null,
          },
          { transaction },
        );
        await models.QueryEvent.create({ queryId: row.id, actorId: raisedBy, action: 'raised', note: query.note }, { transaction });
      }
    });

    const keyLine = config.demo.partnerKey ? [] : [`Demo partner key for ${PARTNER_EMAIL} (lookup, identify), shown once: ${key}`];
    say(config, logger, [...demoSignInLines(config), ...keyLine]);
  },
  async down({ context: { sequelize, models } }) {
    await sequelize.transaction(async (transaction) => {
      const users = await models.User.findAll({ where: { email: { [Op.in]: DEMO_ACCOUNTS.map((a) => a.email) } }, transaction });
      const ids = users.map((u) => u.id);
      const queries = await models.Query.findAll({ where: { raisedBy: { [Op.in]: ids } }, transaction });
      await models.QueryEvent.destroy({ where: { queryId: { [Op.in]: queries.map((q) => q.id) } }, transaction });
      await models.Query.destroy({ where: { raisedBy: { [Op.in]: ids } }, transaction });
      await models.PartnerKey.destroy({ where: { ownerId: { [Op.in]: ids } }, transaction });
      await models.User.destroy({ where: { id: { [Op.in]: ids } }, transaction });
    });
  },
};
