import type { PhotoRow } from './photo-store';

/** How a photo appears in API answers. */
export interface PhotoView {
  url: string;
  mediaType: string;
  width: number;
  height: number;
  caption: string | null;
  credit: string | null;
}

export function photoView(photo: PhotoRow): PhotoView {
  return {
    url: `/api/v1/photos/${photo.fileName}`,
    mediaType: photo.mediaType,
    width: photo.width,
    height: photo.height,
    caption: photo.caption,
    credit: photo.credit,
  };
}
