import pluginVue from 'eslint-plugin-vue';
import { configureVueProject, defineConfigWithVueTs, vueTsConfigs } from '@vue/eslint-config-typescript';
import tseslint from 'typescript-eslint';

// Type-aware rules (typescript-eslint's recommendedTypeChecked) over every .ts and every .vue with
// <script lang="ts">, through TypeScript's project service (tsconfig.json). The library turns off the
// no-unsafe-* rules (Vue's component types are partly `any` to typescript-eslint).
configureVueProject({ rootDir: import.meta.dirname });

export default defineConfigWithVueTs(
  { ignores: ['dist/**', 'dev-dist/**', 'node_modules/**', 'coverage/**', 'test-results/**', 'playwright-report/**', '.data/**', '.stryker-tmp/**', 'reports/**'] },
  pluginVue.configs['flat/essential'],
  vueTsConfigs.recommendedTypeChecked,
  {
    // Migrations are never edited once landed (DEVELOPERS.md): only the rules that need no types.
    files: ['migrations/**/*.ts'],
    ...tseslint.configs.disableTypeChecked,
  },
  {
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
      '@typescript-eslint/no-non-null-assertion': 'off',
    },
  },
  {
    // shared/ runs on the tablet and the server alike: pure TypeScript and zod only.
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            { group: ['vue', 'vue-*', '@vue/*', 'pinia', 'quasar', '@quasar/*'], message: 'shared/ must not import the UI framework.' },
            { group: ['express', 'knex', 'pg', 'node:*', 'fs', 'path', 'crypto'], message: 'shared/ must not import server or Node code.' },
            { group: ['idb-keyval', '@/*', '../src/*', '../server/*', '../../src/*', '../../server/*'], message: 'shared/ must not import client storage or app code.' },
          ],
        },
      ],
    },
  },
  {
    files: ['src/pages/**/*.vue', 'src/layouts/**/*.vue', 'src/components/**/*.vue'],
    rules: { 'vue/multi-word-component-names': 'off' },
  },
);
