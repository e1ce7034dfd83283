/**
 * Reads the reference tree matrix from seeds/matrix into one MatrixDocument.
 *
 * Invariant: the result is deterministic for a given checkout — taxon files are read in file-name
 * order and taxa are sorted by id — so editions built from it differ only where the data differs.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { InseparablePair, MatrixDocument, Taxon, Trait } from '@shared/engine';

/** The seeds folder when running from source; bundled callers pass the folder explicitly. */
export const SEEDS_DIR = dirname(fileURLToPath(import.meta.url));

/** Absolute path of the value drawings; a value's `illustration` is relative to it. */
export const ILLUSTRATIONS_DIR = join(SEEDS_DIR, 'illustrations');

interface TraitsFile {
  title: string;
  region?: string;
  traits: Trait[];
}

interface TaxaFile {
  taxa: Taxon[];
}

interface InseparableFile {
  inseparable: InseparablePair[];
}

function readJson<T>(path: string): T {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as T;
  } catch (error) {
    throw new Error(`cannot read matrix file ${path}: ${(error as Error).message}`, { cause: error });
  }
}

/** The names of the taxon files, in the order they are read. */
export function taxonFileNames(seedsDir: string = SEEDS_DIR): string[] {
  return readdirSync(join(seedsDir, 'matrix', 'taxa'))
    .filter((name) => name.endsWith('.json'))
    .sort();
}

export function loadReferenceMatrix(seedsDir: string = SEEDS_DIR): MatrixDocument {
  const matrixDir = join(seedsDir, 'matrix');
  const traitsFile = readJson<TraitsFile>(join(matrixDir, 'traits.json'));
  const taxa: Taxon[] = [];
  for (const name of taxonFileNames(seedsDir)) {
    const file = readJson<TaxaFile>(join(matrixDir, 'taxa', name));
    if (!Array.isArray(file.taxa)) throw new Error(`matrix file ${name} has no "taxa" array`);
    taxa.push(...file.taxa);
  }
  taxa.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  const { inseparable } = readJson<InseparableFile>(join(matrixDir, 'inseparable.json'));

  const doc: MatrixDocument = {
    format: 'sylvasift-matrix',
    version: 1,
    title: traitsFile.title,
    traits: traitsFile.traits,
    taxa,
    inseparable,
  };
  if (traitsFile.region !== undefined) doc.region = traitsFile.region;
  return doc;
}
