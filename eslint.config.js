import pluginVue from 'eslint-plugin-vue'
import { defineConfigWithVueTs, vueTsConfigs } from '@vue/eslint-config-typescript'
import skipFormatting from '@vue/eslint-config-prettier/skip-formatting'
import globals from 'globals'

export default defineConfigWithVueTs(
  { name: 'app/files-to-lint', files: ['**/*.{ts,mts,vue}'] },
  {
    name: 'app/ignores',
    ignores: [
      'dist/**',
      'data/**',
      'node_modules/**',
      'server/migrations/**',
      // AssemblyScript, checked by its compiler (npm run build:wasm)
      'server/**/assembly/**',
      'coverage/**',
      'tmp/**',
    ],
  },
  pluginVue.configs['flat/essential'],
  vueTsConfigs.recommended,
  skipFormatting,
  {
    name: 'app/node-globals',
    files: ['server/**', 'tests/**', '*.config.*'],
    languageOptions: { globals: globals.node },
  },
  {
    name: 'app/boundaries-client',
    files: ['src/**'],
    rules: { 'no-restricted-imports': ['error', { patterns: ['@server/*', '**/server/**'] }] },
  },
  {
    name: 'app/boundaries-server',
    files: ['server/**'],
    rules: { 'no-restricted-imports': ['error', { patterns: ['@/*', '**/src/**'] }] },
  },
  {
    name: 'app/boundaries-shared',
    files: ['shared/**'],
    rules: {
      'no-restricted-imports': [
        'error',
        { patterns: ['@/*', '@server/*', 'node:*', 'vue', '@mikro-orm/*', 'express'] },
      ],
    },
  },
  {
    name: 'app/unused',
    rules: {
      '@typescript-eslint/no-unused-vars': [
        'error',
        { argsIgnorePattern: '^_', varsIgnorePattern: '^_' },
      ],
    },
  },
)
