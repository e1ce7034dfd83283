// @ts-check
import eslint from '@eslint/js';
import tseslint from 'typescript-eslint';
import angular from 'angular-eslint';
import globals from 'globals';

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
    files: ['tests/**/*.ts'],
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
