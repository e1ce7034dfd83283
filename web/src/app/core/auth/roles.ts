/** Which roles may open which screens; the server checks every request on its own. */
export const ALL_ROLES = ['learner', 'coach', 'curator', 'reviewer', 'admin'] as const;

/** Any signed-in user may hold partner keys. */
export const KEY_HOLDER_ROLES: readonly string[] = ALL_ROLES;

/** The Matrix desk: the working matrix, editions and the change log. */
export const CURATOR_ROLES: readonly string[] = ['curator', 'admin'];

/** People, every partner key and backups. */
export const ADMIN_ROLES: readonly string[] = ['admin'];
