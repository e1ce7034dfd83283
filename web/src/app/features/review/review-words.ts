import { cellInBrief, cellOf, commonName, type CompiledMatrix, type CompiledTrait } from '@shared/engine';
import type { CellQuery, QueryEvent, QueryState } from '../../core/api/query-service';

/** Roles that work the Second look queue (the server decides; this only shapes the screens). */
export function worksSecondLook(role: string | undefined): boolean {
  return role === 'reviewer' || role === 'admin';
}

export const STATE_LABELS: Readonly<Record<QueryState, string>> = { open: 'Open', answered: 'Answered', settled: 'Settled' };

const ACTION_WORDS: Readonly<Record<QueryEvent['action'], string>> = {
  raised: 'raised the query',
  answered: 'answered',
  settled: 'settled it, keeping the cell',
  recoded: 'recoded the cell and settled it',
};

export function actionWords(event: QueryEvent): string {
  return ACTION_WORDS[event.action];
}

/** How a settled query ended, in words. */
export function outcomeWords(query: CellQuery): string {
  if (query.outcome === 'recoded') return 'The cell was recoded.';
  if (query.outcome === 'kept') return 'The cell was kept as it is.';
  return '';
}

const RELATIVE = new Intl.RelativeTimeFormat('en', { numeric: 'auto' });
const STEPS: ReadonlyArray<[Intl.RelativeTimeFormatUnit, number]> = [
  ['year', 365 * 24 * 3600],
  ['month', 30 * 24 * 3600],
  ['week', 7 * 24 * 3600],
  ['day', 24 * 3600],
  ['hour', 3600],
  ['minute', 60],
];

/** "3 days ago", "just now": how long ago an ISO time was. */
export function ageOf(iso: string, now = Date.now()): string {
  const seconds = (now - Date.parse(iso)) / 1000;
  if (!Number.isFinite(seconds)) return '';
  for (const [unit, size] of STEPS) if (seconds >= size) return RELATIVE.format(-Math.floor(seconds / size), unit);
  return 'just now';
}

/** A calendar date and time a person reads: "2 Dec 2026, 01:40". */
export function whenOf(iso: string): string {
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? '' : date.toLocaleString('en-GB', { dateStyle: 'medium', timeStyle: 'short' });
}

/** What a query is about, in the current edition's words. */
export interface QueryCellWords {
  speciesName: string;
  scientificName: string;
  traitLabel: string;
  /** the cell as the current edition codes it */
  codedNow: string;
  trait: CompiledTrait | null;
}

export function queryCellWords(compiled: CompiledMatrix | null, query: Pick<CellQuery, 'taxonId' | 'traitCode'>): QueryCellWords {
  const taxonIndex = compiled?.taxonIndexById.get(query.taxonId);
  const traitIndex = compiled?.traitIndexByCode.get(query.traitCode);
  const taxon = compiled && taxonIndex !== undefined ? compiled.taxa[taxonIndex] : null;
  const trait = compiled && traitIndex !== undefined ? compiled.traits[traitIndex] : null;
  return {
    speciesName: taxon ? commonName(taxon) : query.taxonId,
    scientificName: taxon?.scientificName ?? '',
    traitLabel: trait?.label ?? query.traitCode,
    codedNow: compiled && taxon && trait ? cellInBrief(trait, cellOf(compiled, taxon.id, trait.code)) : 'not in the current edition',
    trait,
  };
}

/** The name of whoever raised the query, from its history. */
export function raiserName(query: CellQuery): string {
  return query.history.find((event) => event.action === 'raised')?.actorName ?? 'someone';
}
