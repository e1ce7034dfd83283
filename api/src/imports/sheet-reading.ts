/**
 * Reads an uploaded matrix sheet (CSV or XLSX) into rows of text fields keyed by column name.
 *
 * Invariant: a row number is the one a spreadsheet shows (the header is row 1), and every problem
 * names a row and, where one is to blame, a column; nothing here knows about taxa or traits.
 */
import ExcelJS from 'exceljs';
import Papa from 'papaparse';

/** The columns of an import sheet, in the order the documentation shows them. */
export const SHEET_COLUMNS = ['taxon', 'trait', 'usual', 'occasional', 'rare', 'min', 'low', 'high', 'max', 'state'] as const;
export type SheetColumn = (typeof SHEET_COLUMNS)[number];

/** Data rows read from one sheet at most; a matrix of a few hundred taxa fits many times over. */
export const MAX_SHEET_ROWS = 20_000;

export interface SheetProblem {
  row: number;
  column: SheetColumn | null;
  message: string;
}

export interface SheetRow {
  row: number;
  fields: Record<SheetColumn, string>;
}

export interface Sheet {
  rows: SheetRow[];
  problems: SheetProblem[];
}

/** An XLSX workbook is a ZIP archive, whose local file header starts with these four bytes. */
const ZIP_SIGNATURE = Buffer.from([0x50, 0x4b, 0x03, 0x04]);

export function looksLikeXlsx(content: Buffer): boolean {
  return content.subarray(0, ZIP_SIGNATURE.length).equals(ZIP_SIGNATURE);
}

/** Reads the sheet, judging its type by content: a ZIP is read as XLSX, anything else as UTF-8 CSV. */
export async function readSheet(content: Buffer): Promise<Sheet> {
  const table = looksLikeXlsx(content) ? await xlsxTable(content) : csvTable(content);
  if ('problem' in table) return { rows: [], problems: [table.problem] };
  return tableToSheet(table.records, table.problems);
}

interface Table {
  /** [row number, fields] for every non-empty record, the header first */
  records: Array<[number, string[]]>;
  problems: SheetProblem[];
}

function csvTable(content: Buffer): Table | { problem: SheetProblem } {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(content);
  } catch {
    return { problem: { row: 1, column: null, message: 'The file is neither an XLSX workbook nor UTF-8 text; save the sheet as CSV (UTF-8) or XLSX.' } };
  }
  const parsed = Papa.parse<string[]>(text, { delimiter: ',', skipEmptyLines: false });
  const problems: SheetProblem[] = parsed.errors.map((error) => ({
    row: (error.row ?? 0) + 1,
    column: null,
    message: `The CSV is malformed at row ${(error.row ?? 0) + 1}: ${error.message.toLowerCase()}.`,
  }));
  const records = parsed.data.map((fields, index): [number, string[]] => [index + 1, fields]);
  return { records: records.filter(([, fields]) => fields.some((field) => field.trim() !== '')), problems: uniqueByRow(problems) };
}

function uniqueByRow(problems: SheetProblem[]): SheetProblem[] {
  const seen = new Set<number>();
  return problems.filter((problem) => !seen.has(problem.row) && seen.add(problem.row));
}

async function xlsxTable(content: Buffer): Promise<Table | { problem: SheetProblem }> {
  const workbook = new ExcelJS.Workbook();
  try {
    await workbook.xlsx.load(content as unknown as ArrayBuffer);
  } catch {
    return { problem: { row: 1, column: null, message: 'The file starts like an XLSX workbook but could not be read as one.' } };
  }
  const worksheet = workbook.worksheets[0];
  if (!worksheet) return { problem: { row: 1, column: null, message: 'The workbook has no worksheet.' } };
  const records: Array<[number, string[]]> = [];
  worksheet.eachRow({ includeEmpty: false }, (row) => {
    const fields: string[] = [];
    for (let column = 1; column <= row.cellCount; column += 1) fields.push(row.getCell(column).text);
    if (fields.some((field) => field.trim() !== '')) records.push([row.number, fields]);
  });
  return { records, problems: [] };
}

function tableToSheet(records: Array<[number, string[]]>, problems: SheetProblem[]): Sheet {
  const [header, ...data] = records;
  if (!header)
    return {
      rows: [],
      problems: [...problems, { row: 1, column: null, message: `The sheet is empty; its first row must name the columns ${SHEET_COLUMNS.join(', ')}.` }],
    };

  const [headerRow, headerFields] = header;
  const names = headerFields.map((name) => name.trim().toLowerCase());
  const known = new Set<string>(SHEET_COLUMNS);
  for (const name of names) {
    if (name !== '' && !known.has(name))
      problems.push({
        row: headerRow,
        column: null,
        message: `The header has a column "${name}" this sheet layout does not use (columns: ${SHEET_COLUMNS.join(', ')}).`,
      });
  }
  for (const column of SHEET_COLUMNS) {
    const count = names.filter((name) => name === column).length;
    if (count === 0) problems.push({ row: headerRow, column, message: `The header has no "${column}" column.` });
    if (count > 1) problems.push({ row: headerRow, column, message: `The header names "${column}" ${count} times.` });
  }
  if (data.length > MAX_SHEET_ROWS)
    problems.push({ row: data[MAX_SHEET_ROWS]![0], column: null, message: `A sheet may have at most ${MAX_SHEET_ROWS} data rows.` });
  if (problems.some((problem) => problem.row === headerRow)) return { rows: [], problems };

  const position = new Map(SHEET_COLUMNS.map((column) => [column, names.indexOf(column)]));
  const rows = data.slice(0, MAX_SHEET_ROWS).map(([row, fields]) => ({
    row,
    fields: Object.fromEntries(SHEET_COLUMNS.map((column) => [column, (fields[position.get(column)!] ?? '').trim()])) as Record<SheetColumn, string>,
  }));
  return { rows, problems };
}
