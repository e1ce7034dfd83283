import { Router } from 'express';
import { requireUser } from '../auth/guards';
import { actorOf } from '../matrix/actor';
import { photoService, type PhotoDeps } from './photo-service';

interface MultipartFile {
  fieldname: string;
  buffer: Buffer;
  size: number;
}

/** POST /taxa/{id}/photos (curators) and GET /photos/{name} (anyone). */
export function photoRoutes(deps: PhotoDeps): { upload: Router; serve: Router } {
  const photos = photoService(deps);
  const upload = Router();
  upload.post('/:id/photos', requireUser('curator'), async (req, res) => {
    const files = (req.files ?? []) as MultipartFile[];
    const body = req.body as { caption?: string; credit?: string; format?: 'jpeg' | 'webp' };
    const photo = await photos.attach(
      actorOf(req.principal),
      req.params['id'] as string,
      files.find((f) => f.fieldname === 'photo'),
      body,
    );
    res.status(201).location(photo.url).json(photo);
  });

  const serve = Router();
  serve.get('/:name', async (req, res) => {
    const { filePath, mediaType } = await photos.locate(req.params['name'] as string);
    // A stored photo never changes: its name is random and new uploads get new names.
    res.set('Cache-Control', 'public, max-age=31536000, immutable');
    res.set('X-Content-Type-Options', 'nosniff');
    res.type(mediaType).sendFile(filePath);
  });
  return { upload, serve };
}
