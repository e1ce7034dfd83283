import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'yaml';
import type { OpenAPIV3_1 } from 'openapi-types';
import { REPO_ROOT } from '../config';

export const OPENAPI_PATH = path.join(REPO_ROOT, 'openapi.yaml');

let cached: OpenAPIV3_1.Document | undefined;

/** The API contract, parsed once from openapi.yaml at the repo root. */
export function loadOpenApiDocument(): OpenAPIV3_1.Document {
  cached ??= parse(fs.readFileSync(OPENAPI_PATH, 'utf8')) as OpenAPIV3_1.Document;
  return cached;
}
