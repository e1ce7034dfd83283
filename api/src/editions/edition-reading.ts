import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from './edition-models';
import { problems } from '../http/problem';
import { findEditionHeader, listEditionHeaders } from './edition-store';
import { editionView, type EditionView } from './edition-views';

/** Every published edition, newest first; the first is the current one. */
export async function listEditions(models: MatrixModels & EditionModels): Promise<{ current: number | null; editions: EditionView[] }> {
  const editions = (await listEditionHeaders(models)).map(editionView);
  return { current: editions[0]?.number ?? null, editions };
}

export async function getEdition(models: MatrixModels & EditionModels, number: number): Promise<EditionView> {
  const edition = await findEditionHeader(models, number);
  if (!edition) throw problems.notFound(`There is no edition ${number}.`);
  return editionView(edition);
}
