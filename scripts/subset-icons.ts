/**
 * Runs before `ng build`: writes web/src/styles/generated/material-icons.woff2, the Material Icons
 * font cut down to the icons the app names. An icon is written as its ligature (`<mat-icon>search</mat-icon>`,
 * or a name in a string the template shows), so every word in web/src is shaped with the full font;
 * the words that come out as one ligature glyph are the icons. The subset keeps those glyphs, their
 * private-use code points, the letters their names are spelled with, and only the ligatures among them.
 *
 * Run: npx tsx scripts/subset-icons.ts
 */
import { mkdir, readFile, readdir, writeFile } from 'node:fs/promises';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import fontverter from 'fontverter';
import * as hb from 'harfbuzzjs';
import subsetFont from 'subset-font';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const FULL_FONT = path.join(root, 'fonts/material-icons/material-icons-latin-400-normal.woff2');
export const ICON_SUBSET = path.join(root, 'web/src/styles/generated/material-icons.woff2');
const SOURCES = path.join(root, 'web/src');

async function* sourceFiles(folder: string): AsyncGenerator<string> {
  for (const entry of await readdir(folder, { withFileTypes: true })) {
    const full = path.join(folder, entry.name);
    if (entry.isDirectory()) {
      if (entry.name !== 'generated') yield* sourceFiles(full);
    } else if (/\.(html|ts)$/.test(entry.name)) yield full;
  }
}

interface Shaper {
  /** the glyph ids `text` shapes to */
  glyphs(text: string): number[];
  codePoints: Uint32Array;
}

function shaper(sfnt: Buffer): Shaper {
  const blob = new hb.Blob(sfnt);
  const face = new hb.Face(blob);
  const font = new hb.Font(face);
  return {
    codePoints: Uint32Array.from(face.collectUnicodes()),
    glyphs(text: string): number[] {
      const buffer = new hb.Buffer();
      buffer.addText(text);
      buffer.guessSegmentProperties();
      hb.shape(font, buffer);
      return buffer.getGlyphInfos().map((info) => info.codepoint);
    },
  };
}

const full = await fontverter.convert(await readFile(FULL_FONT), 'sfnt');
const fullShaper = shaper(full);

// Private-use code point of each icon glyph, so the subset can keep the glyph through its cmap entry.
const codePointOfGlyph = new Map<number, number>();
const letterGlyphs = new Set<number>();
for (const codePoint of fullShaper.codePoints) {
  const [glyph] = fullShaper.glyphs(String.fromCodePoint(codePoint));
  if (codePoint >= 0xe000 && codePoint <= 0xf8ff) codePointOfGlyph.set(glyph, codePoint);
  else letterGlyphs.add(glyph);
}

const words = new Set<string>();
for await (const file of sourceFiles(SOURCES)) {
  for (const match of (await readFile(file, 'utf8')).matchAll(/[a-z0-9]+(?:_[a-z0-9]+)*/g)) words.add(match[0]);
}
const icons = new Map<string, number>();
for (const word of words) {
  if (word.length < 2) continue;
  const glyphs = fullShaper.glyphs(word);
  if (glyphs.length === 1 && !letterGlyphs.has(glyphs[0]) && codePointOfGlyph.has(glyphs[0])) icons.set(word, glyphs[0]);
}
if (icons.size === 0) throw new Error('no icon names found in web/src');

const letters = new Set([...icons.keys()].join(''));
const text = [...letters].join('') + [...new Set(icons.values())].map((glyph) => String.fromCodePoint(codePointOfGlyph.get(glyph) as number)).join('');
const subset = await subsetFont(await readFile(FULL_FONT), text, { targetFormat: 'woff2', noLayoutClosure: true });

// Every icon must still shape to one glyph, and a name we do not use must not.
const check = shaper(await fontverter.convert(subset, 'sfnt'));
for (const name of icons.keys()) {
  if (check.glyphs(name).length !== 1) throw new Error(`the subset lost the icon "${name}"`);
}
const unused = ['zoom_in', 'airplanemode_active', 'yard'].find((name) => !icons.has(name) && fullShaper.glyphs(name).length === 1);
if (unused && check.glyphs(unused).length === 1) throw new Error(`the subset still has the unused icon "${unused}"`);

await mkdir(path.dirname(ICON_SUBSET), { recursive: true });
await writeFile(ICON_SUBSET, subset);
console.log(
  `${path.relative(root, ICON_SUBSET)}: ${icons.size} icons, ${(subset.byteLength / 1000).toFixed(1)} kB (the full font is ${((await readFile(FULL_FONT)).byteLength / 1000).toFixed(0)} kB)`,
);
console.log(`  ${[...icons.keys()].sort().join(' ')}`);
