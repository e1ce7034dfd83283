import type { Cell, MatrixProblem, Trait } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionSummary, EditionModels } from '../editions/edition-models';
import type { EditionCatalog } from '../editions/edition-catalog';
import { hasChanges, summariseChanges } from '../editions/edition-snapshot';
import { readWorkingMatrix } from '../matrix/matrix-store';
import { curatedProblems, invalidCells } from '../matrix/matrix-problems';
import { readCellVersions } from './working-matrix-store';

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
  /** the cells that break a cell rule (publishing is refused while there are any) */
  invalidCells: Array<{ taxonId: string; traitCode: string; problems: string[] }>;
  warnings: number;
}

/** What publishing now would change, and whether the draft can be published. */
async function summariseDraft({ models, editions }: DraftDeps): Promise<DraftSummary> {
  const draft = await readWorkingMatrix(models, { title: 'draft' });
  const current = (await models.Edition.count()) > 0 ? await editions.current() : undefined;
  const summary = summariseChanges(current?.document, draft);
  const found = curatedProblems(draft);
  const errors = found.filter((problem) => problem.severity === 'error');
  return {
    basedOn: current?.number ?? null,
    summary,
    publishable: errors.length === 0 && hasChanges(summary),
    errors: errors.slice(0, 100),
    invalidCells: invalidCells(errors).slice(0, 100),
    warnings: found.length - errors.length,
  };
}

/** The working matrix as the Matrix desk grid shows it: every live taxon and trait, every cell and its version. */
export interface WorkingMatrixView {
  basedOn: number | null;
  traits: Trait[];
  taxa: Array<{ id: string; scientificName: string; family: string; commonNames: string[]; cells: Record<string, Cell>; versions: Record<string, number> }>;
}

/**
 * The same, packed for a large grid: each taxon's cells are one JSON text of the cells in the order of
 * `traits` (a page decodes only the rows it draws, instead of building every cell at once), and its
 * versions a list in that order (0: never written).
 */
export interface PackedWorkingMatrixView {
  basedOn: number | null;
  traits: Trait[];
  taxa: Array<{ id: string; scientificName: string; family: string; commonNames: string[]; packed: string; versions: number[] }>;
}

async function readWorkingMatrixView({ models }: DraftDeps, format: 'full' | 'packed' = 'full'): Promise<WorkingMatrixView | PackedWorkingMatrixView> {
  const document = await readWorkingMatrix(models, { title: 'working matrix' });
  const versions = await readCellVersions(models);
  const latest = await models.Edition.max<number | null, InstanceType<typeof models.Edition>>('number');
  const codes = document.traits.map((trait) => trait.code);
  const live = new Set(codes);
  const header = { basedOn: latest ?? null, traits: document.traits };
  const names = (taxon: (typeof document.taxa)[number]) => ({
    id: taxon.id,
    scientificName: taxon.scientificName,
    family: taxon.family,
    commonNames: taxon.commonNames,
  });
  if (format === 'packed') {
    return {
      ...header,
      taxa: document.taxa.map((taxon) => ({
        ...names(taxon),
        packed: JSON.stringify(codes.map((code) => taxon.cells[code] ?? 'unknown')),
        versions: codes.map((code) => versions.get(taxon.id)?.[code] ?? 0),
      })),
    };
  }
  return {
    ...header,
    taxa: document.taxa.map((taxon) => ({
      ...names(taxon),
      cells: taxon.cells,
      versions: Object.fromEntries(Object.entries(versions.get(taxon.id) ?? {}).filter(([code]) => live.has(code))),
    })),
  };
}

/** The draft: the working matrix compared with the current edition, and the working matrix for the grid. */
export function draftService(deps: DraftDeps) {
  return {
    summarise: summariseDraft.bind(null, deps),
    workingMatrix: readWorkingMatrixView.bind(null, deps),
  };
}

export type DraftService = ReturnType<typeof draftService>;
