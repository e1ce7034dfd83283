import { expect } from 'chai';
import express from 'express';
import request from 'supertest';
import type { OpenAPIV3_1 } from 'openapi-types';
import { loadOpenApiDocument } from '../../api/src/docs/openapi-document';
import { OPENAPI_PATH } from '../../api/src/config';
import { contractValidation } from '../../api/src/http/openapi-validation';

type Schema = Record<string, unknown>;

const document = loadOpenApiDocument(OPENAPI_PATH);

function resolve(ref: string): Schema {
  let node: unknown = document;
  for (const part of ref.replace(/^#\//, '').split('/')) node = (node as Record<string, unknown>)[part.replace(/~1/g, '/').replace(/~0/g, '~')];
  return node as Schema;
}

function isObjectSchema(schema: Schema): boolean {
  const type = schema['type'];
  return type === 'object' || (Array.isArray(type) && type.includes('object')) || schema['properties'] !== undefined;
}

/** Object schemas reachable from responses that do not close themselves (allOf parts are closed by their parent). */
function openObjects(): string[] {
  const open = new Set<string>();
  const seen = new Set<string>();
  const walk = (schema: Schema | undefined, where: string, partOfAllOf: boolean): void => {
    if (!schema || typeof schema !== 'object') return;
    const ref = schema['$ref'];
    if (typeof ref === 'string') {
      if (seen.has(`${ref}|${partOfAllOf}`)) return;
      seen.add(`${ref}|${partOfAllOf}`);
      walk(resolve(ref), ref, partOfAllOf);
      return;
    }
    const closed = schema['additionalProperties'] !== undefined || schema['unevaluatedProperties'] !== undefined;
    if (isObjectSchema(schema) && !closed && !partOfAllOf && schema['allOf'] === undefined) open.add(where);
    if (Array.isArray(schema['allOf']) && !closed) {
      // closed when one of its parts is a closed object that lists every property
      const parts = (schema['allOf'] as Schema[]).map((part) => (typeof part['$ref'] === 'string' ? resolve(part['$ref']) : part));
      if (!parts.some((part) => part['additionalProperties'] === false)) open.add(`${where} (allOf)`);
    }
    for (const [name, property] of Object.entries((schema['properties'] as Record<string, Schema> | undefined) ?? {}))
      walk(property, `${where}.${name}`, false);
    if (schema['items']) walk(schema['items'] as Schema, `${where}[]`, false);
    for (const key of ['oneOf', 'anyOf'] as const) (schema[key] as Schema[] | undefined)?.forEach((part, i) => walk(part, `${where}|${i}`, false));
    (schema['allOf'] as Schema[] | undefined)?.forEach((part, i) => walk(part, `${where}&${i}`, true));
    if (typeof schema['additionalProperties'] === 'object') walk(schema['additionalProperties'] as Schema, `${where}{}`, false);
  };
  for (const [path, item] of Object.entries(document.paths ?? {})) {
    for (const [method, operation] of Object.entries(item as Record<string, OpenAPIV3_1.OperationObject>)) {
      for (const [status, response] of Object.entries(operation.responses ?? {})) {
        const resolved = ('$ref' in response ? resolve(response.$ref) : response) as OpenAPIV3_1.ResponseObject;
        for (const [mediaType, content] of Object.entries(resolved.content ?? {}))
          walk(content.schema as Schema, `${method} ${path} ${status} ${mediaType}`, false);
      }
    }
  }
  return [...open];
}

describe('api: the contract describes every property an answer may carry', () => {
  it('closes every object schema a response can reach (additionalProperties or unevaluatedProperties)', () => {
    expect(openObjects()).to.deep.equal([]);
  });

  it('records a response that carries a property the contract does not document', async () => {
    const contract = contractValidation(document, { validateResponses: true });
    const app = express();
    app.use(express.json());
    app.use(contract.middleware);
    const summary = { taxaAdded: [], taxaRemoved: [], traitsAdded: [], traitsRemoved: [], cellsChanged: 0, taxonCount: 60, traitCount: 40 };
    app.get('/api/v1/editions/:number', (_req, res) => {
      res.json({ number: 1, title: 'Reference matrix', publishedAt: '2026-12-01T20:15:31.000Z', summary, publishedBy: 'someone@example.invalid' });
    });
    await request(app).get('/api/v1/editions/1').expect(200);
    expect(contract.violations.map((violation) => violation.message)).to.deep.equal(['/response must NOT have additional properties']);
  });
});
