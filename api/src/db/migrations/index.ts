import type { Step } from '../step';
import { matrix } from './0001-matrix';
import { curationAuditPhotos } from './0002-curation-audit-photos';
import { accountsKeysQueries } from './0003-accounts-keys-queries';
import { studySets } from './0004-study-sets';
import { idempotencyRecords } from './0005-idempotency-records';
import { keyAllowedOrigins } from './0006-key-allowed-origins';

/** Every schema migration, oldest first. Add new ones at the end; never edit a landed one. */
export const migrations: readonly Step[] = [matrix, curationAuditPhotos, accountsKeysQueries, studySets, idempotencyRecords, keyAllowedOrigins];
