/**
 * How long the free-text fields people fill in may be, for the contract, the API's routes and the
 * web app's forms alike.
 *
 * Invariant: each limit here equals the `minLength`/`maxLength` openapi.yaml states for the same
 * field, so a form never accepts what the API refuses (tests/api/field-limits.spec.ts holds them equal).
 */
export const FIELD_LIMITS = Object.freeze({
  /** a person's name as shown to others */
  displayName: Object.freeze({ min: 1, max: 120 }),
  /** an e-mail address: the 256 octets of a mail path less its angle brackets (RFC 5321) */
  email: Object.freeze({ max: 254 }),
  /** long enough to resist guessing, not so long that hashing it is costly */
  password: Object.freeze({ min: 10, max: 200 }),
  /** a partner key's name */
  keyName: Object.freeze({ min: 1, max: 120 }),
  /** a query's note, a reviewer's answer, its evidence and a settling note */
  queryText: Object.freeze({ min: 3, max: 4000 }),
  /** why a cell is changed (kept in the audit log) */
  changeReason: Object.freeze({ min: 3, max: 2000 }),
  /** a study set's name */
  studySetName: Object.freeze({ min: 1, max: 120 }),
  /** the event a study set is for */
  studySetEvent: Object.freeze({ max: 200 }),
  /** a study set's notes */
  studySetNotes: Object.freeze({ max: 4000 }),
} as const);
