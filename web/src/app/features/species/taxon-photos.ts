import { Injectable, type Signal } from '@angular/core';
import { httpResource } from '@angular/common/http';

/** A photo of a taxon as `GET /api/v1/taxa/{id}` lists it. */
export interface TaxonPhoto {
  url: string;
  width: number;
  height: number;
  caption: string | null;
  credit: string | null;
}

function readPhotos(body: unknown): TaxonPhoto[] {
  const photos = typeof body === 'object' && body !== null ? (body as Record<string, unknown>)['photos'] : undefined;
  if (!Array.isArray(photos)) throw new Error('The server answered with an unexpected species record.');
  return photos.flatMap((photo: unknown) => {
    if (typeof photo !== 'object' || photo === null) return [];
    const record = photo as Record<string, unknown>;
    // Only same-origin photo paths are shown; anything else is dropped rather than trusted.
    if (typeof record['url'] !== 'string' || !record['url'].startsWith('/api/')) return [];
    return [
      {
        url: record['url'],
        width: typeof record['width'] === 'number' ? record['width'] : 0,
        height: typeof record['height'] === 'number' ? record['height'] : 0,
        caption: typeof record['caption'] === 'string' ? record['caption'] : null,
        credit: typeof record['credit'] === 'string' ? record['credit'] : null,
      },
    ];
  });
}

/**
 * Photos are attached on the server after an edition is published, so they come from the species
 * record rather than the bundle; the service worker keeps the ones already seen for offline use.
 */
@Injectable({ providedIn: 'root' })
export class TaxonPhotos {
  photosOf(id: Signal<string>) {
    return httpResource<TaxonPhoto[]>(() => `/api/v1/taxa/${encodeURIComponent(id())}`, { parse: readPhotos, defaultValue: [] });
  }
}
