import fs from 'node:fs';
import { parse } from 'yaml';
import type { OpenAPIV3_1 } from 'openapi-types';
const cached = new Map<string, OpenAPIV3_1.Document>();

/** The API contract, parsed once from its file (openapi.yaml at the repo root). */
export function loadOpenApiDocument(file: string): OpenAPIV3_1.Document {
  let document = cached.get(file);
  if (!document) {
    document = parse(fs.readFileSync(file, 'utf8')) as OpenAPIV3_1.Document;
    cached.set(file, document);
  }
  return document;
}
