import type { Actor } from '../matrix/audit-store';
import { recordAudit } from '../matrix/audit-store';
import type { CurationDeps } from '../curation/cell-service';
import { changeKeepingMatrixValid } from '../curation/matrix-guard';
import { writeTransaction } from '../matrix/write-transaction';
import { writeCellIfVersion } from '../curation/working-matrix-store';
import { HttpProblem, problems } from '../http/problem';
import { readWorkingMatrix } from '../matrix/matrix-store';
import { planImport, type ImportPlan } from './import-plan';
import { readCellVersions } from './import-store';
import { readSheet, type SheetProblem } from './sheet-reading';

/** Largest sheet accepted, in bytes. */
export const MAX_SHEET_BYTES = 2 * 1024 * 1024;

export type ImportMode = 'dry-run' | 'apply';

export interface UploadedSheet {
  /** the name the curator's computer gave the file; only ever shown and logged, never used as a path */
  originalname: string;
  buffer: Buffer;
  size: number;
}

export interface ImportReport extends ImportPlan {
  mode: ImportMode;
  file: string;
}

/** The file name as the audit log shows it: no folders, no control characters, not too long. */
function displayName(originalName: string): string {
  const base = originalName.split(/[/\\]/).pop() ?? '';
  // control characters are exactly what this strips from a file name before it reaches the audit log
  // eslint-disable-next-line no-control-regex
  const withoutControls = base.replace(/[\u0000-\u001f\u007f]/g, '');
  const clean = withoutControls.trim().slice(0, 120);
  return clean === '' ? 'sheet' : clean;
}

function assertSheetSent(file: UploadedSheet | undefined): asserts file is UploadedSheet {
  if (!file || file.size === 0)
    throw problems.invalidInput('Send the sheet (CSV or XLSX) as the multipart field "file".', [{ name: '/body/file', reason: 'missing or empty' }]);
  if (file.size > MAX_SHEET_BYTES)
    throw problems.payloadTooLarge(`An import sheet may be at most ${MAX_SHEET_BYTES / 1024 / 1024} MB; split it into several sheets.`);
}

function sheetRefused(file: string, found: SheetProblem[]): HttpProblem {
  const first = found[0];
  const where = first ? ` The first is at row ${first.row}${first.column ? `, column ${first.column}` : ''}: ${first.message}` : '';
  return new HttpProblem(
    422,
    'import-invalid',
    'The sheet has problems',
    `Nothing was imported from ${file}: the sheet has ${found.length} problem${found.length === 1 ? '' : 's'}.${where}`,
    {
      'invalid-params': found.map((problem) => ({
        name: problem.column ? `row ${problem.row}, ${problem.column}` : `row ${problem.row}`,
        reason: problem.message,
      })),
      problems: found,
    },
  );
}

/** Reads the sheet and reports what applying it would change; writes nothing. */
async function previewImport(deps: CurationDeps, file: UploadedSheet | undefined): Promise<ImportReport> {
  assertSheetSent(file);
  const sheet = await readSheet(file.buffer);
  const matrix = await readWorkingMatrix(deps.models, { title: 'working matrix' });
  return { mode: 'dry-run', file: displayName(file.originalname), ...planImport(sheet, matrix) };
}

/**
 * Applies the sheet all or nothing: the plan is worked out again inside the write transaction, and
 * if the sheet has any problem nothing is written. Each changed cell gets a new version and its own
 * audit entry, and one more entry records the import as a whole.
 */
async function applyImport(deps: CurationDeps, actor: Actor, file: UploadedSheet | undefined): Promise<ImportReport> {
  assertSheetSent(file);
  const name = displayName(file.originalname);
  const sheet = await readSheet(file.buffer);
  return writeTransaction(deps.sequelize, async (transaction) => {
    const plan = planImport(sheet, await readWorkingMatrix(deps.models, { title: 'working matrix' }, transaction));
    if (plan.problems.length > 0) throw sheetRefused(name, plan.problems);

    const versions = await readCellVersions(deps.models, transaction);
    await changeKeepingMatrixValid(deps.models, transaction, `The import of ${name}`, async () => {
      for (const change of plan.changes) {
        const version = versions.get(`${change.taxon}/${change.trait}`) ?? 0;
        const written = await writeCellIfVersion(
          deps.sequelize,
          deps.models,
          { taxonId: change.taxon, traitCode: change.trait, value: change.after },
          version,
          transaction,
        );
        if (written === undefined)
          throw problems.conflict(`The cell ${change.taxon} × ${change.trait} changed while ${name} was being imported. Nothing was imported; try again.`);
      }
    });

    const reason = `import ${name}`;
    await recordAudit(
      deps.models,
      actor,
      [
        ...plan.changes.map((change) => ({
          entity: 'cell' as const,
          entityKey: `${change.taxon}/${change.trait}`,
          action: 'set',
          before: change.before,
          after: change.after,
          reason,
        })),
        {
          entity: 'import' as const,
          entityKey: name,
          action: 'apply',
          before: null,
          after: { rows: plan.rows, changed: plan.changes.length, unchanged: plan.unchanged },
          reason,
        },
      ],
      transaction,
    );
    return { mode: 'apply' as const, file: name, ...plan };
  });
}

/** Spreadsheet imports into the working matrix: preview what would change, or apply it. */
export function importService(deps: CurationDeps) {
  return {
    preview: previewImport.bind(null, deps),
    apply: applyImport.bind(null, deps),
  };
}

export type ImportService = ReturnType<typeof importService>;
