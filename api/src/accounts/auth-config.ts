import type { ScryptParams } from '../auth/passwords';

/** Sessions, sign-in throttling, password hashing and the lifetime of e-mailed links (config section `auth`). */
export interface AuthConfig {
  /** how long a session token stays valid after sign-in */
  sessionTtlHours: number;
  scrypt: ScryptParams;
  /** how long a password-reset link works */
  passwordResetTtlMinutes: number;
  /** how long an invitation link works */
  invitationTtlHours: number;
  /** consecutive failed sign-ins for one e-mail address before it is locked */
  signInMaxFailures: number;
  /** how long that address stays locked */
  signInLockMinutes: number;
  /** failed sign-ins for one address before answers are slowed down */
  signInSlowAfter: number;
  /** first delay once slowing starts; it doubles with each further failure, capped at 8 times this */
  signInDelayMs: number;
}
