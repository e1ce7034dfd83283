import { randomBytes } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import sharp from 'sharp';
import type { MatrixModels } from '../matrix/matrix-models';
import type { PhotoModels } from './photo-models';
import { HttpProblem, problems } from '../http/problem';
import { recordAudit, type Actor } from '../matrix/audit-store';
import { findPhotoByFileName, insertPhoto } from './photo-store';
import { photoView, type PhotoView } from './photo-urls';

/** Largest photo accepted, in bytes. */
export const MAX_PHOTO_BYTES = 8 * 1024 * 1024;
/** Longest side kept; larger photos are scaled down. */
const MAX_SIDE = 2048;
/** Formats accepted, judged from the bytes, never from the file name or the declared type. */
const ACCEPTED_FORMATS = new Set(['jpeg', 'png', 'webp', 'heif', 'avif', 'tiff']);
/** A stored photo's name: 32 hex digits and the extension this service chose. */
const STORED_NAME = /^[0-9a-f]{32}\.(jpg|webp)$/;

export interface PhotoDeps {
  models: MatrixModels & PhotoModels;
  uploadsDir: string;
}

export interface UploadedFile {
  buffer: Buffer;
  size: number;
}

function notAnImage(detail: string): HttpProblem {
  return new HttpProblem(415, 'unsupported-media-type', 'Unsupported media type', detail, {
    'invalid-params': [{ name: '/body/photo', reason: detail }],
  });
}

/**
 * Attaches a photo to a taxon. The type is read from the content; the photo is re-encoded (WebP,
 * or JPEG when asked) so no metadata — EXIF, GPS position, camera serials — survives, and it is
 * stored outside the web root under a random name.
 */
async function attachPhoto(
  deps: PhotoDeps,
  actor: Actor,
  taxonId: string,
  file: UploadedFile | undefined,
  details: { caption?: string; credit?: string; format?: 'jpeg' | 'webp' },
): Promise<PhotoView> {
  const taxon = await deps.models.Taxon.findByPk(taxonId);
  if (!taxon || taxon.retired) throw problems.notFound(`There is no taxon "${taxonId}" in the working matrix.`);
  if (!file || file.size === 0) throw problems.invalidInput('Send the photo as the multipart field "photo".', [{ name: '/body/photo', reason: 'missing' }]);
  if (file.size > MAX_PHOTO_BYTES) throw problems.payloadTooLarge(`A photo may be at most ${MAX_PHOTO_BYTES / 1024 / 1024} MB.`);

  const metadata = await sharp(file.buffer)
    .metadata()
    .catch(() => undefined);
  if (!metadata?.format || !ACCEPTED_FORMATS.has(metadata.format)) {
    throw notAnImage('The file is not a photo this service reads (JPEG, PNG, WebP, HEIF, AVIF or TIFF), judging by its content.');
  }
  const format = details.format ?? 'webp';
  // rotate() applies the EXIF orientation before the metadata is dropped; sharp keeps none unless asked.
  const pipeline = sharp(file.buffer).rotate().resize({ width: MAX_SIDE, height: MAX_SIDE, fit: 'inside', withoutEnlargement: true });
  const encoded = await (format === 'jpeg' ? pipeline.jpeg({ quality: 82, mozjpeg: true }) : pipeline.webp({ quality: 80 }))
    .toBuffer({ resolveWithObject: true })
    .catch(() => {
      throw notAnImage('The photo could not be decoded; it may be truncated or corrupt.');
    });

  const fileName = `${randomBytes(16).toString('hex')}.${format === 'jpeg' ? 'jpg' : 'webp'}`;
  await fs.mkdir(deps.uploadsDir, { recursive: true });
  await fs.writeFile(path.join(deps.uploadsDir, fileName), encoded.data, { flag: 'wx' });
  const photo = await insertPhoto(deps.models, {
    taxonId,
    fileName,
    mediaType: format === 'jpeg' ? 'image/jpeg' : 'image/webp',
    width: encoded.info.width,
    height: encoded.info.height,
    bytes: encoded.info.size,
    caption: details.caption ?? null,
    credit: details.credit ?? null,
    uploadedBy: actor.userId,
  });
  await recordAudit(deps.models, actor, [
    {
      entity: 'photo',
      entityKey: `${taxonId}/${fileName}`,
      action: 'attach',
      before: null,
      after: photoView(photo),
      reason: details.caption ?? 'photo attached',
    },
  ]);
  return photoView(photo);
}

/** Where a stored photo's bytes are, for serving; 404 for any name this service did not give out. */
async function locatePhoto(deps: PhotoDeps, name: string): Promise<{ filePath: string; mediaType: string }> {
  if (!STORED_NAME.test(name)) throw problems.notFound('There is no such photo.');
  const photo = await findPhotoByFileName(deps.models, name);
  if (!photo) throw problems.notFound('There is no such photo.');
  return { filePath: path.join(deps.uploadsDir, photo.fileName), mediaType: photo.mediaType };
}

/** Taxon photos: attach an upload (checked, re-encoded, audited) and find a stored one. */
export function photoService(deps: PhotoDeps) {
  return {
    attach: attachPhoto.bind(null, deps),
    locate: locatePhoto.bind(null, deps),
  };
}

export type PhotoService = ReturnType<typeof photoService>;
