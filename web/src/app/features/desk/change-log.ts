/**
 * The change log's rows: one audit entry as the table shows it, and the rows as CSV.
 *
 * Invariant: pure functions of the entries (no Angular), so the words and the CSV can be checked without a browser.
 */
import type { Cell } from '@shared/engine';
import type { AuditEntry } from './desk-service';
import { cellWords } from './grid-model';

export interface ChangeRow {
  id: number;
  at: string;
  who: string;
  entity: string;
  taxon: string;
  trait: string;
  before: string;
  after: string;
  reason: string;
}

const ENTITY_WORDS: Readonly<Record<string, string>> = {
  cell: 'cell',
  taxon: 'taxon',
  trait: 'trait',
  'trait-value': 'trait value',
  import: 'import',
  edition: 'edition',
  photo: 'photo',
};

function isCell(value: unknown): value is Cell {
  return value === 'unknown' || value === 'inapplicable' || (typeof value === 'object' && value !== null && !Array.isArray(value));
}

/** Words for a value before or after a change; codes stand for labels (the log outlives label changes). */
function valueWords(entity: string, action: string, value: unknown): string {
  if (value === null || value === undefined) return entity === 'cell' ? cellWords({}, 'unknown') : '—';
  if (entity === 'cell' && isCell(value)) return cellWords({}, value);
  if (typeof value === 'object' && value !== null) {
    const record = value as Record<string, unknown>;
    const name = record['title'] ?? record['scientificName'] ?? record['label'] ?? record['code'] ?? record['id'];
    if (typeof name === 'string') return record['retired'] === true ? `${name} (retired)` : name;
  }
  return action;
}

/** One audit entry as a row of the change log. */
export function changeRow(entry: AuditEntry): ChangeRow {
  const [first = '', second = ''] = entry.entityKey.split('/');
  const taxon = entry.entity === 'cell' || entry.entity === 'taxon' || entry.entity === 'photo' ? first : '';
  const trait = entry.entity === 'cell' ? second : entry.entity === 'trait' || entry.entity === 'trait-value' ? entry.entityKey : '';
  return {
    id: entry.id,
    at: entry.at,
    who: entry.actor.email ?? 'the system',
    entity: ENTITY_WORDS[entry.entity] ?? entry.entity,
    taxon: entry.entity === 'edition' ? `edition ${entry.entityKey}` : taxon,
    trait,
    before: valueWords(entry.entity, entry.action, entry.before),
    after: valueWords(entry.entity, entry.action, entry.after),
    reason: entry.reason,
  };
}

/**
 * One CSV field: quoted when it holds a comma, quote or line break (RFC 4180), and led by an apostrophe
 * when it starts like a formula, so a spreadsheet shows it as text instead of running it (the OWASP
 * guidance on CSV injection).
 */
function csvField(raw: string): string {
  const value = /^[=+\-@\t\r]/.test(raw) ? `'${raw}` : raw;
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/** The rows as CSV (RFC 4180 quoting), with a header line. */
export function changesCsv(rows: readonly ChangeRow[]): string {
  const header = ['when', 'who', 'what', 'taxon', 'trait', 'before', 'after', 'reason'];
  const lines = rows.map((row) => [row.at, row.who, row.entity, row.taxon, row.trait, row.before, row.after, row.reason].map(csvField).join(','));
  return [header.join(','), ...lines].join('\r\n') + '\r\n';
}
