import type { MatrixDocument } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionSummary, EditionModels } from './edition-models';

/** An edition's header, without its matrix document. */
export interface EditionHeader {
  number: number;
  title: string;
  publishedAt: Date;
  publishedBy: string | null;
  summary: EditionSummary;
}

export interface EditionWithDocument extends EditionHeader {
  document: MatrixDocument;
}

const HEADER_FIELDS = ['number', 'title', 'publishedAt', 'publishedBy', 'summary'] as const;

/** Every published edition, newest first. */
export async function listEditionHeaders(models: MatrixModels & EditionModels): Promise<EditionHeader[]> {
  const rows = await models.Edition.findAll({ attributes: [...HEADER_FIELDS], order: [['number', 'DESC']] });
  return rows.map((row) => ({
    number: row.number,
    title: row.title,
    publishedAt: row.publishedAt,
    publishedBy: row.publishedBy,
    summary: row.summary,
  }));
}

export async function findEditionHeader(models: MatrixModels & EditionModels, number: number): Promise<EditionHeader | undefined> {
  const row = await models.Edition.findByPk(number, { attributes: [...HEADER_FIELDS] });
  return row ? { number: row.number, title: row.title, publishedAt: row.publishedAt, publishedBy: row.publishedBy, summary: row.summary } : undefined;
}

/** The number of the newest edition, or undefined when nothing has been published. */
export async function latestEditionNumber(models: MatrixModels & EditionModels): Promise<number | undefined> {
  const latest = await models.Edition.max<number | null, InstanceType<MatrixModels & EditionModels['Edition']>>('number');
  return typeof latest === 'number' ? latest : undefined;
}

export async function findEditionWithDocument(models: MatrixModels & EditionModels, number: number): Promise<EditionWithDocument | undefined> {
  const row = await models.Edition.findByPk(number);
  if (!row) return undefined;
  return {
    number: row.number,
    title: row.title,
    publishedAt: row.publishedAt,
    publishedBy: row.publishedBy,
    summary: row.summary,
    document: row.document as MatrixDocument,
  };
}
