import type { Sequelize } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from './edition-models';
import { recordAudit, type Actor } from '../matrix/audit-store';
import { assertPublishable } from '../matrix/matrix-problems';
import type { EditionCatalog } from './edition-catalog';
import { publishEdition } from './edition-service';
import { editionView, type EditionView } from './edition-views';

export interface PublishingDeps {
  sequelize: Sequelize;
  models: MatrixModels & EditionModels;
  editions: EditionCatalog;
}

/**
 * Publishes the working matrix as the next edition: only a matrix without errors is published, the
 * audit log records who did it, and from then on identify and the bundle serve the new edition.
 */
export async function publishWorkingMatrix(deps: PublishingDeps, actor: Actor, request: { title: string; region?: string; reason: string }): Promise<EditionView> {
  const published = await publishEdition(
    deps.sequelize,
    deps.models,
    { title: request.title, region: request.region, publishedBy: actor.email ?? undefined },
    {
      check: (document) => assertPublishable(document, 'Nothing was published'),
      published: (edition, transaction) =>
        recordAudit(
          deps.models,
          actor,
          [{ entity: 'edition', entityKey: String(edition.number), action: 'publish', before: null, after: { title: edition.title, summary: edition.summary }, reason: request.reason }],
          transaction,
        ),
    },
  );
  deps.editions.invalidate();
  return editionView({ ...published, publishedBy: actor.email });
}
