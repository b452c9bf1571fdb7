// Lint at zero warnings. The engine is a leaf: it may import only itself and pure libraries.
import js from '@eslint/js';
import reactHooks from 'eslint-plugin-react-hooks';
import tseslint from 'typescript-eslint';

export default tseslint.config(
  {
    ignores: [
      'node_modules/**',
      'renderer/dist/**',
      'bin/**',
      'dist/**',
      'scripts/**',
      'app/desktop/*.cjs',
      'app/api/*.mjs',
      'test-output/**',
      'tmp/**',
      'eslint.config.js',
      'stryker.config.mjs',
      'reports/**',
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommendedTypeChecked,
  {
    languageOptions: {
      parserOptions: { projectService: true, tsconfigRootDir: import.meta.dirname },
    },
    rules: {
      '@typescript-eslint/consistent-type-imports': 'error',
      '@typescript-eslint/no-floating-promises': 'error',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_' }],
      '@typescript-eslint/restrict-template-expressions': ['error', { allowNumber: true }],
    },
  },
  {
    // The rules of hooks (called unconditionally, effects list what they read) for the window.
    files: ['renderer/src/**/*.{ts,tsx}', 'test/ui/**/*.tsx'],
    plugins: { 'react-hooks': reactHooks },
    rules: {
      ...reactHooks.configs.recommended.rules,
      // useLoad(fetcher, deps) takes its dependency list as useEffect does: check it the same way.
      'react-hooks/exhaustive-deps': ['warn', { additionalHooks: '^useLoad$' }],
    },
  },
  {
    files: ['app/engine/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['../*', '!./*'],
              message: 'app/engine must be independent: import only from app/engine itself.',
            },
            {
              group: ['node:*', 'fs', 'path', 'os', 'child_process', 'crypto', 'http', 'net'],
              message: 'app/engine is pure: no I/O.',
            },
            {
              group: ['electron', 'better-sqlite3', 'react', 'react-dom', 'pdfkit'],
              message: 'app/engine is pure: no platform libraries.',
            },
          ],
        },
      ],
      'no-restricted-globals': [
        'error',
        { name: 'Date', message: 'app/engine has no clock: take dates as inputs.' },
        { name: 'fetch', message: 'app/engine is pure: no I/O.' },
        { name: 'process', message: 'app/engine is pure: no process access.' },
      ],
      'no-restricted-properties': [
        'error',
        { object: 'Math', property: 'random', message: 'app/engine is deterministic.' },
      ],
    },
  }, // Method folders (resonance/, dial-chart/) import their engine siblings one level up.
  {
    files: ['app/engine/*/**/*.ts'],
    rules: {
      'no-restricted-imports': [
        'error',
        {
          patterns: [
            {
              group: ['../../*'],
              message: 'app/engine must be independent: import only from app/engine itself.',
            },
            {
              group: ['node:*', 'fs', 'path', 'os', 'child_process', 'crypto', 'http', 'net'],
              message: 'app/engine is pure: no I/O.',
            },
            {
              group: ['electron', 'better-sqlite3', 'react', 'react-dom', 'pdfkit'],
              message: 'app/engine is pure: no platform libraries.',
            },
          ],
        },
      ],
      'no-restricted-globals': [
        'error',
        { name: 'Date', message: 'app/engine has no clock: take dates as inputs.' },
        { name: 'fetch', message: 'app/engine is pure: no I/O.' },
        { name: 'process', message: 'app/engine is pure: no process access.' },
      ],
      'no-restricted-properties': [
        'error',
        { object: 'Math', property: 'random', message: 'app/engine is deterministic.' },
      ],
    },
  },
);
