// @ts-check
import eslint from '@eslint/js';
import tseslint from 'typescript-eslint';
import angular from 'angular-eslint';
import { readFileSync } from 'node:fs';
import globals from 'globals';
import { importX } from 'eslint-plugin-import-x';
import { createTypeScriptImportResolver } from 'eslint-import-resolver-typescript';

/**
 * api/layers.json: which api/src folders each folder may import (besides its own files and
 * packages; `*` is any folder). Lower layers first; a folder never imports one that imports it, so there are no folder cycles. The files
 * directly in api/src (app.ts, config.ts, server.ts, db-cli.ts) are the composition root: they may
 * import any folder and no folder imports them. db/ assembles every feature's models, runs the
 * migrations and seeders, and is imported by the root alone (admin reads only the migration list).
 * scripts/check-layers.ts reads the same table and fails on a folder missing from it, on an import
 * the table does not allow, and on any folder cycle in the actual imports (type-only ones included).
 */
const API_LAYERS = JSON.parse(readFileSync(new URL('./api/layers.json', import.meta.url), 'utf8'));

const layerRules = Object.entries(API_LAYERS)
  .filter(([, allowed]) => !allowed.includes('*'))
  .map(([folder, allowed]) => ({
    files: [`api/src/${folder}/**/*.ts`],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              // `../<folder>/…` is another api/src folder; `db/migrations` is allowed as the list itself only
              regex: `^\\.\\./(?!(?:${allowed.map((a) => (a.includes('/') ? `${a}$` : `${a}/`)).join('|') || '(?!)'}))[^./][^/]*(/|$)`,
              message: `api/src/${folder} may import only ${allowed.length ? allowed.join(', ') : 'no other api/src folder'} (see api/layers.json and DEVELOPERS.md).`,
            },
            {
              regex: '-routes$',
              message: 'Routers are mounted by the composition root (app.ts) only; import the service, not the routes.',
            },
          ],
        },
      ],
    },
  }));

export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.angular/**', 'data/**', 'test-results/**', 'coverage/**'] },
  {
    files: ['**/*.ts'],
    extends: [eslint.configs.recommended, ...tseslint.configs.recommended, ...tseslint.configs.stylistic],
    languageOptions: { globals: { ...globals.node } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-explicit-any': 'error',
      '@typescript-eslint/consistent-type-imports': ['error', { fixStyle: 'inline-type-imports' }],
      eqeqeq: ['error', 'always'],
      '@typescript-eslint/array-type': ['error', { default: 'array-simple' }],
    },
  },
  {
    // Rules that need type information. The project service finds each file's nearest tsconfig.json:
    // api/tsconfig.json, shared/engine/tsconfig.json, tests/e2e/tsconfig.json, web/tsconfig.json
    // (the app and its specs) and the root one for scripts/, seeds/ and the other tests.
    files: ['**/*.ts'],
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      '@typescript-eslint/no-floating-promises': 'error',
      // Express 5 forwards a rejected promise from a handler or middleware to the error handler, and
      // @types/express 5 types a handler's result as `unknown`, so `router.get(path, async (req, res) => …)`
      // is not a misused promise: the rule keeps its defaults (checksVoidReturn on), which still catch an
      // async callback handed to an event emitter, a timer or a DOM listener that would drop its rejection.
      '@typescript-eslint/no-misused-promises': 'error',
      '@typescript-eslint/await-thenable': 'error',
      '@typescript-eslint/require-await': 'error',
    },
  },
  {
    files: ['api/**/*.ts', 'shared/**/*.ts'],
    plugins: { 'import-x': importX },
    settings: {
      // the plugin's TypeScript settings (which files to parse), with the resolver that knows @shared/*
      ...importX.flatConfigs.typescript.settings,
      'import-x/resolver': undefined,
      'import-x/resolver-next': [createTypeScriptImportResolver({ project: 'tsconfig.json' })],
    },
    rules: {
      // file-level cycles; scripts/check-layers.ts (run by `npm run lint`) catches folder-level ones
      'import-x/no-cycle': ['error', { ignoreExternal: true }],
    },
  },
  ...layerRules,
  {
    files: ['tests/**/*.ts', 'web/**/*.spec.ts'],
    rules: {
      // chai's property assertions (`expect(x).to.be.true`) read as unused expressions
      '@typescript-eslint/no-unused-expressions': 'off',
    },
  },
  {
    files: ['web/**/*.ts'],
    extends: [...angular.configs.tsRecommended],
    processor: angular.processInlineTemplates,
    languageOptions: { globals: { ...globals.browser } },
    rules: {
      '@angular-eslint/directive-selector': ['error', { type: 'attribute', prefix: 'sv', style: 'camelCase' }],
      '@angular-eslint/component-selector': ['error', { type: 'element', prefix: 'sv', style: 'kebab-case' }],
      '@angular-eslint/prefer-on-push-component-change-detection': 'error',
      '@angular-eslint/component-class-suffix': 'off',
    },
  },
  {
    // The engine is one package with one entry point: outside it, import `@shared/engine` (its index),
    // never a file inside it, so only the public surface is used. Named exception: the engine's own
    // tests (tests/engine/, e.g. internals.spec.ts) check its internals and may import them.
    files: ['api/**/*.ts', 'web/**/*.ts', 'scripts/**/*.ts', 'seeds/**/*.ts', 'tests/**/*.ts'],
    ignores: ['tests/engine/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { regex: '^@shared/engine/', message: 'Import the engine from `@shared/engine` (its index), not a file inside it.' },
            { regex: '(^|/)shared/engine(/|$)', message: 'Import the engine as `@shared/engine`, not by a relative path.' },
          ],
        },
      ],
    },
  },
  {
    files: ['web/**/*.html'],
    extends: [...angular.configs.templateRecommended, ...angular.configs.templateAccessibility],
  },
  {
    files: ['**/*.js'],
    extends: [eslint.configs.recommended],
    languageOptions: { globals: { ...globals.node } },
  },
);
