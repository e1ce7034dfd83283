import type { Sequelize } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from './edition-models';
import { recordAudit, type Actor } from '../matrix/audit-store';
import { assertPublishable } from '../matrix/matrix-problems';
import type { EditionCatalog } from './edition-catalog';
import { problems } from '../http/problem';
import { hasChanges, snapshotWorkingMatrix } from './edition-snapshot';
import { findEditionHeader, listEditionHeaders } from './edition-store';
import { editionView, type EditionView } from './edition-views';

export interface EditionDeps {
  sequelize: Sequelize;
  models: MatrixModels & EditionModels;
  editions: EditionCatalog;
}

/** Every published edition, newest first; the first is the current one. */
async function list(deps: EditionDeps): Promise<{ current: number | null; editions: EditionView[] }> {
  const editions = (await listEditionHeaders(deps.models)).map(editionView);
  return { current: editions[0]?.number ?? null, editions };
}

async function get(deps: EditionDeps, number: number): Promise<EditionView> {
  const edition = await findEditionHeader(deps.models, number);
  if (!edition) throw problems.notFound(`There is no edition ${number}.`);
  return editionView(edition);
}

/**
 * Publishes the working matrix as the next edition: only a matrix without errors that differs from
 * the current edition is published (409 otherwise, the reason in `reason`), the
 * audit log records who did it, and from then on identify and the bundle serve the new edition.
 */
async function publish(deps: EditionDeps, actor: Actor, request: { title: string; region?: string; reason: string }): Promise<EditionView> {
  const published = await snapshotWorkingMatrix(
    deps.sequelize,
    deps.models,
    { title: request.title, region: request.region, publishedBy: actor.email ?? undefined },
    {
      check: (document) => assertPublishable(document, 'Nothing was published'),
      checkChanges: (summary, latest) => {
        if (latest !== null && !hasChanges(summary)) {
          throw problems.conflict(`Nothing was published: the working matrix is the same as edition ${latest} (no taxon, trait or cell changed).`, {
            reason: 'no-changes',
            basedOn: latest,
          });
        }
      },
      published: (edition, transaction) =>
        recordAudit(
          deps.models,
          actor,
          [
            {
              entity: 'edition',
              entityKey: String(edition.number),
              action: 'publish',
              before: null,
              after: { title: edition.title, summary: edition.summary },
              reason: request.reason,
            },
          ],
          transaction,
        ),
    },
  );
  deps.editions.invalidate();
  return editionView({ ...published, publishedBy: actor.email });
}

/** Published editions: list them, read one, publish the working matrix as the next. */
export function editionService(deps: EditionDeps) {
  return {
    list: list.bind(null, deps),
    get: get.bind(null, deps),
    publish: publish.bind(null, deps),
  };
}

export type EditionService = ReturnType<typeof editionService>;
