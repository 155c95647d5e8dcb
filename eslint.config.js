import pluginVue from 'eslint-plugin-vue';
import { defineConfigWithVueTs, vueTsConfigs } from '@vue/eslint-config-typescript';

export default defineConfigWithVueTs(
  { ignores: ['dist/**', 'dev-dist/**', 'node_modules/**', 'coverage/**', 'test-results/**', 'playwright-report/**', '.data/**', '.stryker-tmp/**', 'reports/**'] },
  pluginVue.configs['flat/essential'],
  vueTsConfigs.recommended,
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
