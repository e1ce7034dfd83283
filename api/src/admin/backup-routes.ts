import { Router } from 'express';
import { requireUser } from '../auth/guards';
import type { Backup, BackupService } from './backup-service';

const backupView = (backup: Backup) => ({ name: backup.name, bytes: backup.bytes, createdAt: backup.createdAt.toISOString() });

/** SQLite snapshots for admins (mounted at /api/v1/admin/backups). */
export function backupRoutes(backups: BackupService): Router {
  const router = Router();
  router.use(requireUser('admin'), (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });

  router.post('/', async (_req, res) => {
    const backup = await backups.create();
    res.status(201).json(backupView(backup));
  });

  router.get('/', async (_req, res) => {
    res.json({ backups: (await backups.list()).map(backupView) });
  });

  router.get('/:name', async (req, res) => {
    const name = String(req.params['name']);
    const file = await backups.fileFor(name);
    // attachment() sets a type from the extension, so the SQLite type (IANA application/vnd.sqlite3) goes after it
    res.attachment(name).type('application/vnd.sqlite3').sendFile(file);
  });

  router.post('/:name/restore', async (req, res) => {
    await backups.restore(String(req.params['name']));
    res.status(204).end();
  });

  return router;
}
