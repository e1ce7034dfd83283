import fs from 'node:fs';
import path from 'node:path';
import express, { Router } from 'express';

/**
 * Serves the built Angular app: hashed assets cached for a year, index.html revalidated every
 * time, and history fallback so deep links (/sift?…, /species/pinus-taeda) load the app.
 */
export function webRoutes(webRoot: string): Router {
  const router = Router();
  const indexFile = path.join(webRoot, 'index.html');
  router.use(
    express.static(webRoot, {
      index: false,
      setHeaders(res, filePath) {
        const name = path.basename(filePath);
        if (/-[A-Z0-9]{8}\.(js|css)$/.test(name)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
        else if (name === 'ngsw.json' || name === 'ngsw-worker.js' || name === 'index.html') res.setHeader('Cache-Control', 'no-cache');
        else res.setHeader('Cache-Control', 'public, max-age=3600');
      },
    }),
  );
  router.get(/.*/, (req, res, next) => {
    if (!req.accepts('html') || path.extname(req.path) !== '') {
      next();
      return;
    }
    if (!fs.existsSync(indexFile)) {
      res.status(503).type('text/plain').send('The web app has not been built yet: run `npm run build`.');
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
  return router;
}
