/**
 * Type-checks each tsconfig given on the command line and reports the errors in that project's own
 * files (its `include`) only, not in the files it imports from another project.
 *
 * Why: api/tsconfig.json and web/tsconfig.json turn on noUncheckedIndexedAccess and
 * noPropertyAccessFromIndexSignature; both import the engine through `@shared/engine`, which is
 * checked under shared/engine/tsconfig.json without those flags (its typed-array kernels do not meet
 * them yet). `tsc -p` would report the engine's files under the importer's flags. Once the engine
 * meets the flags too, `tsc -p` replaces this script.
 *
 * Usage: tsx scripts/check-own-files.ts api/tsconfig.json web/tsconfig.json
 */
import ts from 'typescript';
import path from 'node:path';

const host: ts.FormatDiagnosticsHost = {
  getCanonicalFileName: (fileName) => fileName,
  getCurrentDirectory: () => process.cwd(),
  getNewLine: () => '\n',
};

function check(configPath: string): readonly ts.Diagnostic[] {
  const read = ts.readConfigFile(configPath, (file) => ts.sys.readFile(file));
  if (read.error) return [read.error];
  const parsed = ts.parseJsonConfigFileContent(read.config, ts.sys, path.dirname(path.resolve(configPath)));
  if (parsed.errors.length) return parsed.errors;
  const program = ts.createProgram({ rootNames: parsed.fileNames, options: parsed.options, projectReferences: parsed.projectReferences });
  const own = new Set(parsed.fileNames.map((file) => path.resolve(file)));
  const diagnostics: ts.Diagnostic[] = [...program.getOptionsDiagnostics(), ...program.getGlobalDiagnostics()];
  for (const sourceFile of program.getSourceFiles()) {
    if (!own.has(path.resolve(sourceFile.fileName))) continue;
    diagnostics.push(...program.getSyntacticDiagnostics(sourceFile), ...program.getSemanticDiagnostics(sourceFile));
  }
  return diagnostics;
}

const configs = process.argv.slice(2);
if (!configs.length) {
  console.error('usage: tsx scripts/check-own-files.ts <tsconfig.json>...');
  process.exit(2);
}
let failed = 0;
for (const config of configs) {
  const diagnostics = check(config);
  if (diagnostics.length) {
    console.error(ts.formatDiagnosticsWithColorAndContext(diagnostics, host));
    failed += diagnostics.length;
  }
}
if (failed) {
  console.error(`${failed} type error(s)`);
  process.exit(1);
}
