/**
 * Collecting the problems of a matrix document, and the small tests of raw JSON the checks share.
 *
 * Invariant: every problem has a severity, a code, a path into the document and a message, and
 * names the taxon and trait it concerns when there is one; problems keep the order they were found in.
 */
import type { MatrixProblem } from './types';

/** Codes of traits, values and taxa: lower-case words joined by single hyphens. */
export const KEBAB = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;

/** A JSON object as found, before any check. */
export type Record_ = Record<string, unknown>;

export function isObject(value: unknown): value is Record_ {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

export function isNonEmptyString(value: unknown): value is string {
  return typeof value === 'string' && value.trim().length > 0;
}

export class ProblemList {
  readonly items: MatrixProblem[] = [];
  error(path: string, code: string, message: string, taxon?: string, trait?: string): void {
    this.items.push({ severity: 'error', code, path, message, ...(taxon !== undefined && { taxon }), ...(trait !== undefined && { trait }) });
  }
  warning(path: string, code: string, message: string, taxon?: string, trait?: string): void {
    this.items.push({ severity: 'warning', code, path, message, ...(taxon !== undefined && { taxon }), ...(trait !== undefined && { trait }) });
  }
}
