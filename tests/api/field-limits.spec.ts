import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { parse } from 'yaml';
import { FIELD_LIMITS } from '@shared/engine';
import { REPO_ROOT } from '../../api/src/config';

interface StringSchema {
  minLength?: number;
  maxLength?: number;
  $ref?: string;
}
interface Contract {
  components: { schemas: Record<string, StringSchema & { properties?: Record<string, StringSchema> }> };
}

const contract = parse(fs.readFileSync(path.join(REPO_ROOT, 'openapi.yaml'), 'utf8')) as Contract;

/** A schema's field, following one `$ref` (e.g. to Password or ChangeReason). */
function fieldOf(schema: string, field?: string): StringSchema {
  const found = field === undefined ? contract.components.schemas[schema] : contract.components.schemas[schema]?.properties?.[field];
  expect(found, `${schema}${field ? `.${field}` : ''} is in openapi.yaml`).to.not.equal(undefined);
  const ref = found!.$ref;
  return ref ? contract.components.schemas[ref.replace('#/components/schemas/', '')]! : found!;
}

// The forms and the routes take their limits from FIELD_LIMITS; the contract states them again, so
// here they are held equal (a check of the project against itself, no outside source).
describe('api: the free-text field limits agree with the contract', () => {
  const cases: Array<[string, string | undefined, { min?: number; max: number }]> = [
    ['SignUpRequest', 'displayName', FIELD_LIMITS.displayName],
    ['AcceptInvitation', 'displayName', FIELD_LIMITS.displayName],
    ['SignUpRequest', 'email', FIELD_LIMITS.email],
    ['SignInRequest', 'email', FIELD_LIMITS.email],
    ['PasswordResetRequest', 'email', FIELD_LIMITS.email],
    ['Invitation', 'email', FIELD_LIMITS.email],
    ['Password', undefined, FIELD_LIMITS.password],
    ['NewPartnerKey', 'name', FIELD_LIMITS.keyName],
    ['NewQuery', 'note', FIELD_LIMITS.queryText],
    ['QueryAnswer', 'answer', FIELD_LIMITS.queryText],
    ['QueryAnswer', 'evidence', { max: FIELD_LIMITS.queryText.max }],
    ['QuerySettle', 'note', { max: FIELD_LIMITS.queryText.max }],
    ['ChangeReason', undefined, FIELD_LIMITS.changeReason],
    ['NewStudySet', 'name', FIELD_LIMITS.studySetName],
    ['StudySetChange', 'name', FIELD_LIMITS.studySetName],
    ['NewStudySet', 'event', FIELD_LIMITS.studySetEvent],
    ['StudySetChange', 'event', FIELD_LIMITS.studySetEvent],
    ['NewStudySet', 'notes', FIELD_LIMITS.studySetNotes],
    ['StudySetChange', 'notes', FIELD_LIMITS.studySetNotes],
  ];
  for (const [schema, field, limit] of cases) {
    it(`${schema}${field ? `.${field}` : ''}: at most ${limit.max}${limit.min !== undefined ? `, at least ${limit.min}` : ''}`, () => {
      const found = fieldOf(schema, field);
      expect(found.maxLength).to.equal(limit.max);
      if (limit.min !== undefined) expect(found.minLength).to.equal(limit.min);
    });
  }

  it('allows an e-mail address no longer than a mail path carries: 256 octets less the angle brackets (RFC 5321, 4.5.3.1.3; from memory)', () => {
    expect(FIELD_LIMITS.email.max).to.equal(256 - 2);
  });
});
