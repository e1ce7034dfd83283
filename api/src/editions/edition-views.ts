import type { EditionSummary } from './edition-models';
import type { EditionHeader } from './edition-store';

export interface EditionView {
  number: number;
  title: string;
  publishedAt: string;
  summary: EditionSummary;
}

export function editionView(edition: EditionHeader): EditionView {
  return { number: edition.number, title: edition.title, publishedAt: edition.publishedAt.toISOString(), summary: edition.summary };
}
