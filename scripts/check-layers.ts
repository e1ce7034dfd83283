/**
 * Fails when the folders of api/src import each other in a circle. ESLint's import-x/no-cycle sees
 * cycles between files only; this sees cycles between folders (accounts -> keys -> accounts), which
 * is what keeps the components apart. It also fails on a folder that api/layers.json (the table
 * eslint.config.js enforces) does not list, and on an import that table does not allow. The files
 * directly in api/src (app.ts, config.ts, server.ts, db-cli.ts) are the composition root: they may
 * import every folder, and no folder may import them. Type-only imports count: a type cycle is a cycle.
 *
 * Prints every folder's imports, then the problems (or that there are none). `--quiet` prints only problems.
 */
import fs from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import layers from '../api/layers.json';

const LAYERS: Record<string, string[]> = layers;

const ROOT = path.resolve(import.meta.dirname, '..');
const SOURCE = path.join(ROOT, 'api/src');
const ROOT_NODE = '(root)';

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(full);
    return entry.name.endsWith('.ts') ? [full] : [];
  });
}

/** The api/src folder a file belongs to, or ROOT_NODE for the files directly in api/src, or undefined outside api/src. */
function folderOf(file: string): string | undefined {
  const relative = path.relative(SOURCE, file);
  if (relative.startsWith('..') || path.isAbsolute(relative)) return undefined;
  const parts = relative.split(path.sep);
  return parts.length === 1 ? ROOT_NODE : parts[0];
}

/** Every import, export-from and dynamic import of a file, type-only ones included: a type cycle is still a cycle. */
function importsOf(file: string): string[] {
  const info = ts.preProcessFile(fs.readFileSync(file, 'utf8'), true, true);
  return info.importedFiles.map((f) => f.fileName).filter((name) => name.startsWith('.'));
}

const edges = new Map<string, Map<string, string[]>>();
const problems: string[] = [];
const folders = fs
  .readdirSync(SOURCE, { withFileTypes: true })
  .filter((entry) => entry.isDirectory())
  .map((entry) => entry.name);
for (const folder of folders) if (!(folder in LAYERS)) problems.push(`api/src/${folder} is not in api/layers.json: say which folders it may import`);
for (const folder of Object.keys(LAYERS)) if (!folders.includes(folder)) problems.push(`api/layers.json lists ${folder}, which is not a folder of api/src`);
for (const file of sourceFiles(SOURCE)) {
  const from = folderOf(file);
  if (from === undefined) continue;
  for (const specifier of importsOf(file)) {
    const to = folderOf(path.resolve(path.dirname(file), specifier));
    if (to === undefined || to === from) continue;
    const where = `${path.relative(ROOT, file)} -> ${specifier}`;
    if (to === ROOT_NODE) {
      problems.push(`${where}: only the composition root (api/src/*.ts) may import api/src/${path.basename(specifier)}; pass what is needed in`);
      continue;
    }
    const allowed = LAYERS[from];
    const target = path
      .relative(SOURCE, path.resolve(path.dirname(file), specifier))
      .split(path.sep)
      .join('/');
    if (allowed && !allowed.includes('*') && !allowed.includes(to) && !allowed.includes(target)) {
      problems.push(`${where}: api/src/${from} may import only ${allowed.join(', ') || 'no other api/src folder'} (api/layers.json)`);
    }
    const targets = edges.get(from) ?? new Map<string, string[]>();
    targets.set(to, [...(targets.get(to) ?? []), where]);
    edges.set(from, targets);
  }
}

/** Tarjan's strongly connected components: each component of more than one folder is a cycle. */
function cycles(): string[][] {
  let index = 0;
  const indices = new Map<string, number>();
  const lowLinks = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const found: string[][] = [];
  const visit = (node: string): void => {
    indices.set(node, index);
    lowLinks.set(node, index);
    index += 1;
    stack.push(node);
    onStack.add(node);
    for (const next of edges.get(node)?.keys() ?? []) {
      if (!indices.has(next)) {
        visit(next);
        lowLinks.set(node, Math.min(lowLinks.get(node)!, lowLinks.get(next)!));
      } else if (onStack.has(next)) {
        lowLinks.set(node, Math.min(lowLinks.get(node)!, indices.get(next)!));
      }
    }
    if (lowLinks.get(node) === indices.get(node)) {
      const component: string[] = [];
      let member: string;
      do {
        member = stack.pop()!;
        onStack.delete(member);
        component.push(member);
      } while (member !== node);
      if (component.length > 1) found.push(component.sort());
    }
  };
  for (const node of [...edges.keys()].sort()) if (!indices.has(node)) visit(node);
  return found;
}

const quiet = process.argv.includes('--quiet');
if (!quiet) {
  console.log('api/src folder imports:');
  for (const [from, targets] of [...edges].sort(([a], [b]) => a.localeCompare(b))) {
    console.log(`  ${from.padEnd(10)} -> ${[...targets.keys()].sort().join(', ')}`);
  }
}
for (const component of cycles()) {
  const members = new Set(component);
  const lines = component.flatMap((from) =>
    [...(edges.get(from) ?? [])].filter(([to]) => members.has(to)).flatMap(([, where]) => where.map((w) => `      ${w}`)),
  );
  problems.push(`folder cycle: ${component.join(' <-> ')}\n${lines.join('\n')}`);
}
if (problems.length > 0) {
  console.error(`\n${problems.length} layer problem(s):\n  - ${problems.join('\n  - ')}`);
  process.exit(1);
}
console.log(
  quiet
    ? 'api/src: no folder-level import cycles; every import keeps api/layers.json'
    : '\nno folder-level import cycles in api/src; every import keeps api/layers.json',
);
