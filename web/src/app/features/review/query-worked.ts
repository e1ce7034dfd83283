import type { CellQuery } from '../../core/api/query-service';
import { ApiProblem } from '../../core/http/api-problem';

/** What a reviewer's action on a query left behind: the query as it is now, and a sentence saying so. */
export interface QueryWorked {
  query: CellQuery;
  notice: string;
}

/** Whether a refusal means someone else moved the query on meanwhile, so the page shows it afresh. */
export function movedOn(error: unknown): boolean {
  return error instanceof ApiProblem && error.status === 409;
}
