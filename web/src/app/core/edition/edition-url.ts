/** Where the current edition's engine bundle is served; its own file so the app shell can name it without the engine. */
export const BUNDLE_URL = '/api/v1/editions/current/bundle';
