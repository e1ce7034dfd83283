import type { Sequelize, Transaction } from 'sequelize';
import type { MatrixDocument } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionSummary, EditionModels } from './edition-models';
import { readWorkingMatrix } from '../matrix/matrix-store';
import { writeTransaction } from '../matrix/write-transaction';

export interface PublishRequest {
  title: string;
  region?: string;
  publishedBy?: string;
}

export interface PublishedEdition {
  number: number;
  title: string;
  publishedAt: Date;
  summary: EditionSummary;
}

/** Compares two documents: taxa and traits added or removed, and cells whose coding changed. */
export function summariseChanges(previous: MatrixDocument | undefined, next: MatrixDocument): EditionSummary {
  const before = new Map((previous?.taxa ?? []).map((t) => [t.id, t]));
  const after = new Map(next.taxa.map((t) => [t.id, t]));
  const traitsBefore = new Set((previous?.traits ?? []).map((t) => t.code));
  const traitsAfter = new Set(next.traits.map((t) => t.code));
  let cellsChanged = 0;
  for (const [id, taxon] of after) {
    const old = before.get(id);
    const codes = new Set([...Object.keys(taxon.cells), ...Object.keys(old?.cells ?? {})]);
    for (const code of codes) {
      if (JSON.stringify(taxon.cells[code] ?? 'unknown') !== JSON.stringify(old?.cells[code] ?? 'unknown')) cellsChanged++;
    }
  }
  return {
    taxaAdded: [...after.keys()].filter((id) => !before.has(id)),
    taxaRemoved: [...before.keys()].filter((id) => !after.has(id)),
    traitsAdded: [...traitsAfter].filter((c) => !traitsBefore.has(c)),
    traitsRemoved: [...traitsBefore].filter((c) => !traitsAfter.has(c)),
    cellsChanged,
    taxonCount: next.taxa.length,
    traitCount: next.traits.length,
  };
}

/** Whether a change summary changes anything a sift sees: taxa or traits added or removed, or a cell recoded. */
export function hasChanges(summary: EditionSummary): boolean {
  return summary.cellsChanged + summary.taxaAdded.length + summary.taxaRemoved.length + summary.traitsAdded.length + summary.traitsRemoved.length > 0;
}

/** Steps a caller adds inside the snapshot's transaction. */
export interface PublishHooks {
  /** sees the document about to be published; throw to stop publishing */
  check?(document: MatrixDocument): void;
  /** sees what the edition would change against the latest one (null before the first); throw to stop publishing */
  checkChanges?(summary: EditionSummary, latest: number | null): void;
  /** runs after the edition row is written, in the same transaction (e.g. the audit entry) */
  published?(edition: PublishedEdition, transaction: Transaction): Promise<void>;
}

/**
 * Writes the working matrix as the next immutable, numbered edition, in one transaction. This is the
 * storage step only: `editionService(...).publish` adds the checks, the audit entry and the catalog refresh.
 */
export async function snapshotWorkingMatrix(
  sequelize: Sequelize,
  models: MatrixModels & EditionModels,
  request: PublishRequest,
  hooks: PublishHooks = {},
): Promise<PublishedEdition> {
  return writeTransaction(sequelize, async (transaction) => {
    const document = await readWorkingMatrix(models, { title: request.title, region: request.region }, transaction);
    hooks.check?.(document);
    const latest = await models.Edition.findOne({ order: [['number', 'DESC']], transaction });
    const summary = summariseChanges(latest?.document as MatrixDocument | undefined, document);
    hooks.checkChanges?.(summary, latest?.number ?? null);
    const edition = await models.Edition.create(
      {
        number: (latest?.number ?? 0) + 1,
        title: request.title,
        publishedAt: new Date(),
        publishedBy: request.publishedBy ?? null,
        summary,
        document,
      },
      { transaction },
    );
    const published = { number: edition.number, title: edition.title, publishedAt: edition.publishedAt, summary };
    await hooks.published?.(published, transaction);
    return published;
  });
}
