import { Router } from 'express';
import { requireUser } from '../auth/guards';
import { actorOf } from '../matrix/actor';
import type { CurationDeps } from '../curation/cell-service';
import { cachePolicy } from '../http/caching';
import { importService, type ImportMode, type UploadedSheet } from './import-service';

interface MultipartFile extends UploadedSheet {
  fieldname: string;
}

/** POST /curation/imports?mode=dry-run|apply: a matrix sheet, previewed or applied all or nothing. */
export function importRoutes(deps: CurationDeps): Router {
  const imports = importService(deps);
  const router = Router();
  router.post('/', requireUser('curator'), async (req, res) => {
    const files = (req.files ?? []) as MultipartFile[];
    const file = files.find((f) => f.fieldname === 'file');
    const mode = (req.query['mode'] ?? 'dry-run') as ImportMode;
    const report = mode === 'apply' ? await imports.apply(actorOf(req.principal), file) : await imports.preview(file);
    cachePolicy.noStore(res);
    res.json(report);
  });
  return router;
}
