import { HttpErrorResponse, type HttpInterceptorFn } from '@angular/common/http';
import { catchError, from, switchMap, throwError } from 'rxjs';
import { problemFromResponse } from './api-problem';

async function readBody(error: HttpErrorResponse): Promise<unknown> {
  const body: unknown = error.error;
  // Binary and blob requests get their error body in that form; problem+json is still JSON inside.
  if (body instanceof ArrayBuffer) return parseJson(new TextDecoder().decode(body));
  if (body instanceof Blob) return parseJson(await body.text());
  if (typeof body === 'string') return parseJson(body);
  return body;
}

function parseJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}

/** Turns every failed API response (problem+json or not) and every network failure into an ApiProblem. */
export const errorInterceptor: HttpInterceptorFn = (request, next) =>
  next(request).pipe(
    catchError((error: unknown) => {
      if (!(error instanceof HttpErrorResponse)) return throwError(() => error);
      return from(readBody(error)).pipe(switchMap((body) => throwError(() => problemFromResponse(error.status, body))));
    }),
  );
