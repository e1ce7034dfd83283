/** Copies the font files the app serves from their npm packages into fonts/ (run after upgrading them). */
import fs from 'node:fs';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '..');
const copies: Array<[string, string]> = [
  ...['latin-400-normal', 'latin-500-normal', 'latin-700-normal', 'latin-400-italic', 'latin-ext-400-normal', 'latin-ext-700-normal'].map(
    (variant): [string, string] => [`@fontsource/noto-sans/files/noto-sans-${variant}.woff2`, `noto-sans/noto-sans-${variant}.woff2`],
  ),
  ['@fontsource/noto-sans/LICENSE', 'noto-sans/LICENSE'],
  ['@fontsource/material-icons/files/material-icons-latin-400-normal.woff2', 'material-icons/material-icons-latin-400-normal.woff2'],
  ['@fontsource/material-icons/LICENSE', 'material-icons/LICENSE'],
];

for (const [from, to] of copies) {
  const target = path.join(root, 'fonts', to);
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.copyFileSync(path.join(root, 'node_modules', from), target);
  console.log(`fonts/${to}`);
}
