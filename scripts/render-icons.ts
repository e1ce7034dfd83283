/**
 * Renders the app icons in web/public/icons from icon.svg: the 192 and 512 px tiles, and a maskable
 * 512 px variant whose mark is shrunk into the central safe zone (a circle of 40% of the size) on a
 * full-bleed background, so launchers can crop it to any shape.
 *
 * Run: npx tsx scripts/render-icons.ts
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';

const iconsDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../web/public/icons');

/** Scale of the mark in the maskable icon; its farthest point then sits inside the 40% safe radius. */
const MASKABLE_MARK_SCALE = 0.8;

async function render(svg: string, size: number, file: string): Promise<void> {
  const out = path.join(iconsDir, file);
  await sharp(Buffer.from(svg), { density: (72 * size) / 512 })
    .resize(size, size)
    .png({ compressionLevel: 9 })
    .toFile(out);
  const meta = await sharp(out).metadata();
  if (meta.width !== size || meta.height !== size) {
    throw new Error(`${file}: expected ${size}x${size}, got ${meta.width}x${meta.height}`);
  }
  console.log(`wrote ${path.relative(process.cwd(), out)} (${size}x${size})`);
}

function maskable(iconSvg: string): string {
  const tile = /<rect id="tile"[^>]*fill="([^"]+)"/.exec(iconSvg);
  const mark = /<g id="mark">([\s\S]*?)<\/g>/.exec(iconSvg);
  if (!tile || !mark) throw new Error('icon.svg must contain <rect id="tile" fill=…> and <g id="mark">…</g>');
  const s = MASKABLE_MARK_SCALE;
  return (
    '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 512 512">' +
    `<rect width="512" height="512" fill="${tile[1]}"/>` +
    `<g transform="translate(256 256) scale(${s}) translate(-256 -256)">${mark[1]}</g></svg>`
  );
}

const iconSvg = await readFile(path.join(iconsDir, 'icon.svg'), 'utf8');
await render(iconSvg, 192, 'icon-192.png');
await render(iconSvg, 512, 'icon-512.png');
await render(maskable(iconSvg), 512, 'maskable-512.png');
