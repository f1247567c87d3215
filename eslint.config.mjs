// ESLint flat config: the recommended sets only (ESLint core, typescript-eslint, angular-eslint for
// components and their templates). Formatting is Prettier's job (see .prettierrc.json), not ESLint's.
import js from '@eslint/js';
import { defineConfig, globalIgnores } from 'eslint/config';
import tseslint from 'typescript-eslint';
import angular from 'angular-eslint';
import globals from 'globals';

export default defineConfig([
  globalIgnores(['dist/', 'coverage/', '.angular/', 'data/', 'test-output/', 'node_modules/']),
  {
    // Server, shared domain code, broker, simulator, seeds, scripts and tests: Node.
    files: ['**/*.ts'],
    ignores: ['src/**'],
    extends: [js.configs.recommended, tseslint.configs.recommended],
    languageOptions: { globals: { ...globals.node } },
  },
  {
    // The Angular client, with the component templates written inline.
    files: ['src/**/*.ts'],
    extends: [js.configs.recommended, tseslint.configs.recommended, angular.configs.tsRecommended],
    languageOptions: { globals: { ...globals.browser } },
    processor: angular.processInlineTemplates,
  },
  {
    files: ['src/**/*.html'],
    extends: [angular.configs.templateRecommended],
  },
  {
    files: ['**/*.js', '**/*.mjs'],
    extends: [js.configs.recommended],
    languageOptions: { globals: { ...globals.node } },
  },
]);
