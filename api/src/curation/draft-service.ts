import { validateMatrix, type MatrixProblem } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionSummary, EditionModels } from '../editions/edition-models';
import type { EditionCatalog } from '../editions/edition-catalog';
import { hasChanges, summariseChanges } from '../editions/edition-snapshot';
import { readWorkingMatrix } from '../matrix/matrix-store';

export interface DraftDeps {
  models: MatrixModels & EditionModels;
  editions: EditionCatalog;
}

export interface DraftSummary {
  /** the edition the draft is compared with (the current one), or null before the first */
  basedOn: number | null;
  summary: EditionSummary;
  /** true when the draft has no errors and differs from the current edition */
  publishable: boolean;
  errors: MatrixProblem[];
  warnings: number;
}

/** What publishing now would change, and whether the draft can be published. */
async function summariseDraft({ models, editions }: DraftDeps): Promise<DraftSummary> {
  const draft = await readWorkingMatrix(models, { title: 'draft' });
  const current = (await models.Edition.count()) > 0 ? await editions.current() : undefined;
  const summary = summariseChanges(current?.document, draft);
  const found = validateMatrix(draft);
  const errors = found.filter((problem) => problem.severity === 'error');
  return { basedOn: current?.number ?? null, summary, publishable: errors.length === 0 && hasChanges(summary), errors: errors.slice(0, 100), warnings: found.length - errors.length };
}

/** The draft: the working matrix compared with the current edition. */
export function draftService(deps: DraftDeps) {
  return {
    summarise: summariseDraft.bind(null, deps),
  };
}

export type DraftService = ReturnType<typeof draftService>;
