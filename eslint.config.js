import js from '@eslint/js';
import tseslint from 'typescript-eslint';
import reactHooks from 'eslint-plugin-react-hooks';
import globals from 'globals';

// Boundaries that keep the house readable (see DEVELOPERS.md):
// shared/ imports nothing from src/ or server/ and no Node-only module;
// src/ never imports server/.
export default tseslint.config(
  { ignores: ['dist/**', 'node_modules/**', '.data/**', 'test-results/**'] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_' }],
    },
  },
  {
    files: ['shared/**/*.ts'],
    rules: {
      'no-restricted-imports': ['error', {
        patterns: [
          { group: ['**/src/**', '**/server/**'], message: 'shared/ must not import the client or the server.' },
          { group: ['node:*', 'fs', 'path', 'os', 'child_process', 'crypto'], message: 'shared/ runs in the browser too: no Node-only modules.' },
        ],
      }],
    },
  },
  {
    files: ['src/**/*.{ts,tsx}'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      ...reactHooks.configs.recommended.rules,
      'no-restricted-imports': ['error', {
        patterns: [{ group: ['**/server/**'], message: 'The client reaches the server over HTTP only.' }],
      }],
    },
  },
);
