/**
 * Runs after `ng build`: writes a `.br` (brotli, best quality) and a `.gz` (gzip, level 9) copy beside
 * every text file in dist/web, which the server sends to browsers that accept them
 * (api/src/web/web-routes.ts). A copy that would not be smaller than its file is not written.
 *
 * Run: npx tsx scripts/precompress-web.ts [folder]   (default dist/web)
 */
import { readFile, readdir, rm, stat, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { brotliCompress, constants, gzip } from 'node:zlib';

const brotli = promisify(brotliCompress);
const gzipAsync = promisify(gzip);

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const webRoot = path.resolve(process.argv[2] ?? path.join(root, 'dist/web'));
/** file types that compress; woff2, png and the like are compressed already */
const TEXT = new Set(['.js', '.mjs', '.css', '.html', '.json', '.webmanifest', '.svg', '.txt', '.map', '.ico', '.xml']);
/** smaller files fit in one packet either way (common practice, no source) */
const SMALLEST_BYTES = 256;

async function* files(folder: string): AsyncGenerator<string> {
  for (const entry of await readdir(folder, { withFileTypes: true })) {
    const full = path.join(folder, entry.name);
    if (entry.isDirectory()) yield* files(full);
    else if (entry.isFile()) yield full;
  }
}

let original = 0;
let asBrotli = 0;
let count = 0;
for await (const file of files(webRoot)) {
  if (!TEXT.has(path.extname(file))) continue;
  // Earlier copies are dropped first, so none outlives a file that no longer compresses.
  await Promise.all([rm(`${file}.br`, { force: true }), rm(`${file}.gz`, { force: true })]);
  if ((await stat(file)).size < SMALLEST_BYTES) continue;
  const bytes = await readFile(file);
  const [br, gz] = await Promise.all([
    brotli(bytes, { params: { [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY, [constants.BROTLI_PARAM_SIZE_HINT]: bytes.byteLength } }),
    gzipAsync(bytes, { level: 9 }),
  ]);
  if (br.byteLength < bytes.byteLength) await writeFile(`${file}.br`, br);
  if (gz.byteLength < bytes.byteLength) await writeFile(`${file}.gz`, gz);
  original += bytes.byteLength;
  asBrotli += Math.min(br.byteLength, bytes.byteLength);
  count++;
}
console.log(
  `precompressed ${count} files in ${path.relative(root, webRoot) || '.'}: ${(original / 1000).toFixed(0)} kB → ${(asBrotli / 1000).toFixed(0)} kB with brotli`,
);
