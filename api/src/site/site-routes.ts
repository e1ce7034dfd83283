import fs from 'node:fs';
import path from 'node:path';
import express, { Router, type Request, type RequestHandler, type Response } from 'express';
import { preferredCoding } from '../http/compression';

/** hashed build output (`main-ABCD1234.js`, `chunk-….js`, `styles-….css`, `media/…-….woff2`): never changes under its name */
const HASHED_ASSET = /-[A-Z0-9]{8}\.(js|css|woff2)$/;
/** files that name the current build: always revalidated */
const REVALIDATED = new Set(['index.html', 'ngsw.json', 'ngsw-worker.js', 'safety-worker.js', 'worker-basic.min.js', 'manifest.webmanifest']);
/** our own font files at /fonts change only with a font package upgrade; a month, then revalidate (common practice, no source) */
const FONT_MAX_AGE_S = 30 * 24 * 3600;

function setCacheControl(res: Response, filePath: string): void {
  const name = path.basename(filePath);
  if (HASHED_ASSET.test(name)) res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
  else if (REVALIDATED.has(name)) res.setHeader('Cache-Control', 'no-cache');
  else if (filePath.split(path.sep).includes('fonts')) res.setHeader('Cache-Control', `public, max-age=${FONT_MAX_AGE_S}`);
  else res.setHeader('Cache-Control', 'public, max-age=3600');
}

/**
 * Answers with the `.br` / `.gz` copy that the build wrote beside `file` (scripts/precompress-web.ts)
 * when the browser accepts that coding, with the original's type and cache policy; false when there is
 * no such copy, or it is older than the file (a file replaced without its copies is sent as it is).
 */
async function sendPrecompressed(req: Request, res: Response, file: string): Promise<boolean> {
  const coding = preferredCoding(req);
  const suffix = coding === 'br' ? '.br' : coding === 'gzip' ? '.gz' : null;
  const [original, compressed] = await Promise.all([statOrNull(file), suffix === null ? null : statOrNull(file + suffix)]);
  if (!original?.isFile()) return false;
  res.vary('Accept-Encoding');
  if (coding === null || !compressed?.isFile() || compressed.mtimeMs < original.mtimeMs) return false;
  setCacheControl(res, file);
  res.setHeader('Content-Encoding', coding);
  res.type(path.extname(file) || 'html');
  // send sets Content-Length, Last-Modified and an ETag from the compressed file and answers 304 itself
  await new Promise<void>((resolve, reject) => {
    res.sendFile(file + suffix, { acceptRanges: false, cacheControl: false, dotfiles: 'allow' }, (error?: Error) => (error ? reject(error) : resolve()));
  });
  return true;
}

async function statOrNull(file: string): Promise<fs.Stats | null> {
  try {
    return await fs.promises.stat(file);
  } catch {
    return null;
  }
}

/** static files of the build: their compressed copies where the browser takes them */
function precompressed(webRoot: string): RequestHandler {
  return async (req, res, next) => {
    if ((req.method !== 'GET' && req.method !== 'HEAD') || path.extname(req.path) === '') {
      next();
      return;
    }
    let relative: string;
    try {
      relative = decodeURIComponent(req.path);
    } catch {
      next();
      return;
    }
    const file = path.join(webRoot, path.normalize(relative));
    if (!file.startsWith(webRoot + path.sep) || !(await sendPrecompressed(req, res, file))) next();
  };
}

/**
 * Serves the built Angular app: hashed assets cached for a year, index.html and the service worker's
 * manifest revalidated every time, text files from the compressed copies the build made, and history
 * fallback so deep links (/sift?…, /species/pinus-taeda) load the app.
 */
export function siteRoutes(webRoot: string): Router {
  const router = Router();
  const root = path.resolve(webRoot);
  const indexFile = path.join(root, 'index.html');
  router.use(precompressed(root));
  router.use(express.static(root, { index: false, setHeaders: setCacheControl }));
  router.get(/.*/, async (req, res, next) => {
    if (!req.accepts('html') || path.extname(req.path) !== '') {
      next();
      return;
    }
    if (!fs.existsSync(indexFile)) {
      res.status(503).type('text/plain').send('The web app has not been built yet: run `npm run build`.');
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    if (!(await sendPrecompressed(req, res, indexFile))) res.sendFile(indexFile);
  });
  return router;
}
