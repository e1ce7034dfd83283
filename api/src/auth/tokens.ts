import { createHash, randomBytes } from 'node:crypto';

/** Session tokens and partner keys are told apart by prefix, so one bearer header carries either. */
export const SESSION_PREFIX = 'svs_';
export const KEY_PREFIX = 'svk_';
const LINK_PREFIX = 'svl_';

/** 32 random bytes as base64url: 256 bits, far past guessing. */
function randomToken(prefix: string): string {
  return prefix + randomBytes(32).toString('base64url');
}

export const newSessionToken = () => randomToken(SESSION_PREFIX);
export const newPartnerKey = () => randomToken(KEY_PREFIX);
/** single-use token inside password-reset and invitation links */
export const newLinkToken = () => randomToken(LINK_PREFIX);

/** Tokens are stored only as this hash; a leaked table does not let anyone sign in. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex');
}
